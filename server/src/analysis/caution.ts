/** The caution printed wherever a verdict is shown in full (CLI text report, full analysis view). */
export const SAFETY_CAUTION =
  'Caution: this is an analysis of a linear model, not proof that a machine is safe. ' +
  'Validate on the real system, and follow the applicable functional-safety standards, local codes and licensed engineering practice.';

/** One line for tight spaces (hover). */
export const SAFETY_CAUTION_SHORT = 'A linear-model analysis is not proof of safety; validate on the real system.';
