/**
 * The bulky part of one matrix analysis (spectrum, modes, stability reasons, the sampled
 * model and the matrix the closed form is built from), kept as a compact text while nobody
 * reads it.
 *
 * A document of 10,000 small matrices keeps 10,000 analyses so that an edit recomputes only
 * what changed, yet a user reads a handful at a time (a hover, a lens title, an action). As
 * objects, an exact 2×2 analysis holds about 4 KB of heap (rationals of two BigInts each,
 * small arrays, one object per eigenvalue, factor and mode); as the text below, about 1 KB.
 * So the most recently read HOT_DETAILS analyses stay as objects and older ones are packed;
 * the next reader unpacks one in some tens of microseconds and it becomes recent again.
 *
 * The text is JSON with three tagged forms for what JSON cannot carry: a rational
 * {"q":"num/den"}, a BigInt {"b":"digits"} and a non-finite or negative-zero double
 * {"f":"Infinity"|"-Infinity"|"NaN"|"-0"}, compressed with raw deflate against a preset
 * dictionary of the names every detail repeats, its bytes kept as a one-byte string (JSON
 * text with a √ or λ in it would be stored as two bytes per character). An exact 2×2 detail
 * is 1.4 KB of JSON and about 250 bytes packed; packing costs about 60 µs and unpacking
 * about 30 (measured here on Node 20). Unpacking gives equal values (not the same objects),
 * so nothing may rely on the identity of what it read from a detail.
 */
import { deflateRawSync, inflateRawSync } from 'node:zlib';
import { Rational } from '../engine/rational';
import type { Mode, Spectrum } from '../engine/types';
import type { DiscreteModel } from './report';

export interface MatrixDetail {
  spectrum: Spectrum;
  stabilityReasons: string[];
  modes: Mode[];
  discrete: DiscreteModel | null;
  /** The matrix as analysed: exact entries on the exact path, doubles otherwise. */
  A: Rational[][] | number[][];
}

/**
 * Analyses kept as objects. More than a pass builds between two yields and more than a
 * screen shows, so passes, hovers and lenses of what is on screen never unpack twice;
 * measured here in a heap snapshot of 10,000 one-line matrices, an exact 2×2 detail takes
 * about 3.9 KB as objects and 0.9 KB packed.
 */
export const HOT_DETAILS = 1000;

function replacer(this: unknown, key: string, value: unknown): unknown {
  const raw = (this as Record<string, unknown>)[key];
  if (raw instanceof Rational) return { q: raw.toString() };
  if (typeof value === 'bigint') return { b: value.toString() };
  if (typeof value === 'number' && (!Number.isFinite(value) || Object.is(value, -0))) return { f: Object.is(value, -0) ? '-0' : String(value) };
  return value;
}

function reviver(_key: string, value: unknown): unknown {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return value;
  const keys = Object.keys(value);
  if (keys.length !== 1) return value;
  const v = value as { q?: unknown; b?: unknown; f?: unknown };
  if (typeof v.q === 'string') return rationalOf(v.q);
  if (typeof v.b === 'string') return BigInt(v.b);
  if (typeof v.f === 'string') return v.f === '-0' ? -0 : Number(v.f);
  return value;
}

function rationalOf(text: string): Rational {
  if (text === '0') return Rational.ZERO;
  if (text === '1') return Rational.ONE;
  if (text === '-1') return Rational.MINUS_ONE;
  const slash = text.indexOf('/');
  return slash < 0 ? Rational.fromInt(BigInt(text)) : Rational.of(BigInt(text.slice(0, slash)), BigInt(text.slice(slash + 1)));
}

/**
 * The preset dictionary: what the JSON of every detail repeats (field names, the usual small
 * values), most frequent last, as deflate favours the end of its dictionary.
 */
const DICTIONARY = Buffer.from(
  [
    '"nearRepeated":[],"notes":[]},"perStep":{"radius":,"angle":,"samplesTo2pct":"Ad":[[,"Bd":"Cd":"Dd":"Qd":"method":"zoh","period":',
    '"behaviour":"decays","grows","constant","oscillates","growing-oscillation","polynomial-growth","deadbeat","clusterTolerance":null,',
    '{"spectrum":{"n":2,"exact":true,"charPoly":{"coeffs":[,"exactCoeffs":["minimalPoly":{"coeffs":["factors":[{"coeffs":[{"q":"',
    '"degree":2,"algebraic":1,"index":1,"blocks":[1],"geometric":1,"roots":[{"re":,"im":,"exact":{"p":{"q":"r":{"q":"d":{"q":"text":"',
    '"eigenvalues":[{"re":"algebraic":1,"geometric":1,"blocks":[1]}],"defective":false,"clusterTolerance":null,"nearRepeated":[],"notes":[]},',
    '"stabilityReasons":["every eigenvalue has negative real part"],"modes":[{"eigenvalueIndex":0,"s":{"re":"im":',
    '"behaviour":"decaying-oscillation","timeConstant":"naturalFrequency":"dampingRatio":"period":"settlingTime2pct":"doublingTime":null}],',
    '"discrete":null,"A":[[{"q":"',
  ].join(''),
);

/** The detail as packed text (see the module comment for its form). */
export function packDetail(detail: MatrixDetail): string {
  return deflateRawSync(JSON.stringify(detail, replacer), { dictionary: DICTIONARY }).toString('latin1');
}

export function unpackDetail(text: string): MatrixDetail {
  return JSON.parse(inflateRawSync(Buffer.from(text, 'latin1'), { dictionary: DICTIONARY }).toString('utf8'), reviver) as MatrixDetail;
}

/** Boxes holding their detail as objects, least recently read first. */
const hot = new Set<DetailBox>();
let hotLimit = HOT_DETAILS;
let unpacks = 0;

/** One analysis's detail, as objects while recently read and packed otherwise. */
export class DetailBox {
  #detail: MatrixDetail | null;
  #packed: string | null = null;

  constructor(detail: MatrixDetail) {
    this.#detail = detail;
    warm(this);
  }

  get(): MatrixDetail {
    let detail = this.#detail;
    if (detail === null) {
      detail = unpackDetail(this.#packed!);
      unpacks++;
      this.#detail = detail;
    }
    warm(this);
    return detail;
  }

  /** Packs the detail (once: the text stays for the next time it goes cold). */
  cool(): void {
    if (this.#detail === null) return;
    this.#packed ??= packDetail(this.#detail);
    this.#detail = null;
  }

  get packed(): boolean {
    return this.#detail === null;
  }
}

function warm(box: DetailBox): void {
  hot.delete(box);
  hot.add(box);
  while (hot.size > hotLimit) {
    const oldest = hot.values().next().value as DetailBox;
    hot.delete(oldest);
    oldest.cool();
  }
}

/** For tests and measurements: the bound on unpacked details (HOT_DETAILS by default), and how many unpacks happened. */
export function detailStats(): { hot: number; limit: number; unpacks: number } {
  return { hot: hot.size, limit: hotLimit, unpacks };
}
export function setHotDetailLimit(limit: number): void {
  hotLimit = Math.max(1, Math.floor(limit));
  while (hot.size > hotLimit) {
    const oldest = hot.values().next().value as DetailBox;
    hot.delete(oldest);
    oldest.cool();
  }
}
