// groupedInteger: the thousands grouping of en-US number formatting (the comparison is
// Intl.NumberFormat('en-US') itself, the runtime's own CLDR-based formatter).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { groupedInteger } from '../../server/src/analysis/numberText';

describe('groupedInteger', () => {
  const reference = new Intl.NumberFormat('en-US', { useGrouping: true, maximumFractionDigits: 0 });

  it('groups like en-US formatting for every safe integer', () => {
    fc.assert(fc.property(fc.maxSafeInteger(), (n) => groupedInteger(n) === reference.format(n)), { numRuns: 2000 });
  });

  it('handles the group boundaries', () => {
    for (const n of [0, 7, 999, 1000, 12_345, 999_999, 1_000_000, -1000, -999]) expect(groupedInteger(n)).toBe(reference.format(n));
  });

  it('leaves non-integers as JavaScript prints them', () => {
    expect(groupedInteger(1.5)).toBe('1.5');
    expect(groupedInteger(Number.NaN)).toBe('NaN');
  });
});
