/**
 * The closed-form transition matrix of one state matrix, built when something needs it.
 *
 * A closed form is by far the largest part of an analysis (a 10×10 exact matrix has
 * hundreds of terms with exact coefficient text) and more than half of its cost, while a
 * diagnostics pass only needs the outcome of its numeric check. So the analysis keeps a slot
 * per matrix: the first build (the diagnostics pass's verification step, a hover, a lens, an
 * action or the CLI) records a small summary — check result and cancellation factor — and
 * the full closed form goes to a bounded store shared by the documents; when the store has
 * dropped it, the next reader rebuilds it from the same inputs (the build is deterministic).
 */
import { transitionClosedForm } from '../engine/closedForm';
import type { Rational } from '../engine/rational';
import type { Domain, Spectrum, TransitionClosedForm } from '../engine/types';

/** What findings need from a closed form: its check and its cancellation factor. */
export interface ClosedFormSummary {
  variable: TransitionClosedForm['variable'];
  exactCoefficients: boolean;
  check: TransitionClosedForm['check'];
  conditioning: number;
}

/**
 * Terms held in full across all documents before the least recently used closed forms go.
 * A held term costs about 480 bytes of heap (its exact text included; measured in a heap
 * snapshot of 10,000 one-line matrices: 35 MB for 73,590 terms), and a closed form dropped
 * here is rebuilt in about a millisecond for n ≤ 8 when a hover or lens reads it again, so
 * the store keeps what a user is looking at rather than everything a pass checked. 6,000
 * terms (about 3 MB) hold some 800 closed forms of 2×2 matrices, or a few of 10×10 ones;
 * 30,000 held 14.5 MB in a snapshot of 10,000 one-line matrices, for hovers nobody made.
 */
export const CLOSED_FORM_STORE_TERMS = 6_000;

/** Least recently used closed forms, bounded by their total number of terms. */
export class ClosedFormStore {
  private readonly map = new Map<string, { value: TransitionClosedForm; terms: number }>();
  private terms = 0;
  builds = 0;
  constructor(private readonly maxTerms = CLOSED_FORM_STORE_TERMS) {}

  get(key: string): TransitionClosedForm | undefined {
    const hit = this.map.get(key);
    if (!hit) return undefined;
    this.map.delete(key);
    this.map.set(key, hit);
    return hit.value;
  }

  set(key: string, value: TransitionClosedForm): void {
    const old = this.map.get(key);
    if (old) {
      this.terms -= old.terms;
      this.map.delete(key);
    }
    let terms = 0;
    for (const row of value.entries) for (const cell of row) terms += cell.length;
    this.map.set(key, { value, terms });
    this.terms += terms;
    // Always keep the newest one, however large, so that its reader gets it.
    while (this.terms > this.maxTerms && this.map.size > 1) {
      const [oldest, entry] = this.map.entries().next().value as [string, { terms: number }];
      this.map.delete(oldest);
      this.terms -= entry.terms;
    }
  }

  /** Drops every closed form whose key is not in `keys`. */
  retain(keys: ReadonlySet<string>): void {
    for (const [key, entry] of [...this.map]) {
      if (keys.has(key)) continue;
      this.map.delete(key);
      this.terms -= entry.terms;
    }
  }

  get size(): number {
    return this.map.size;
  }
  get heldTerms(): number {
    return this.terms;
  }
}

export class ClosedFormSlot {
  /** Set by the first successful build. */
  summary: ClosedFormSummary | null = null;
  /** Set when the build threw: the message, reported once through `onError`. */
  error: string | null = null;
  /** Without a shared store (the CLI), the slot keeps its own closed form once built. */
  private own: TransitionClosedForm | null = null;

  constructor(
    private readonly key: string,
    /** The matrix and its spectrum, read only when the closed form is (re)built. */
    private readonly source: () => { A: Rational[][] | number[][]; spectrum: Spectrum },
    private readonly domain: Domain,
    private readonly maxN: number,
    private readonly store: ClosedFormStore | null,
    private readonly onError: (message: string) => void,
  ) {}

  /** Built (or fetched) at least once: its summary is known, or it failed. */
  get settled(): boolean {
    return this.summary !== null || this.error !== null;
  }

  /** The closed form, built now if no store holds it; null when it cannot be built. */
  get(): TransitionClosedForm | null {
    if (this.error !== null) return null;
    if (this.own) return this.own;
    const held = this.store?.get(this.key);
    if (held) return held;
    let value: TransitionClosedForm;
    try {
      // A rebuild repeats the first build exactly, so it keeps that build's check (which the
      // findings already report) rather than running it again: about a third of a rebuild.
      const known = this.summary ? { check: this.summary.check, conditioning: this.summary.conditioning } : undefined;
      const { A, spectrum } = this.source();
      value = transitionClosedForm(A, spectrum, this.domain, { maxN: this.maxN, knownCheck: known });
    } catch (err) {
      this.error = (err as Error).message;
      this.onError(`The closed form could not be built: ${this.error}`);
      return null;
    }
    this.summary = { variable: value.variable, exactCoefficients: value.exactCoefficients, check: value.check, conditioning: value.conditioning };
    if (this.store) {
      this.store.builds++;
      this.store.set(this.key, value);
    } else this.own = value;
    return value;
  }
}
