/**
 * A full garbage collection once the server has nothing to do.
 *
 * Analysing a large document allocates far more than it keeps (spectra, closed forms being
 * checked, report rebuilds), and V8 sizes its heap to that allocation rate; left alone, an
 * idle server keeps the high-water heap resident for a long time. So when the work queue is
 * empty for a while, the server asks for one full collection, which lets V8 return the freed
 * pages. It runs at most once per quiet period, never while a document is being analysed,
 * and not at all when the runtime refuses to expose a collector.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/**
 * How far V8 lets the heap grow past its live size before the next full collection, in
 * percent. Left to itself, V8 grows a heap with a high allocation rate by up to 4× its live
 * size between collections, and the resident memory follows: reading 10,000 one-line
 * matrices peaked at 455 MB with 143 MB live. At 20 % the same reading peaked at 308 MB
 * (2 MB Python file: 335 → 273 MB) for about a tenth more collection time; measured on
 * Node 20 here (npm run limits). V8 reads the flag at every collection, so it can be set
 * after start, unlike the young generation's size.
 */
export const HEAP_GROWING_PERCENT = 20;

/**
 * EIGENLENS_HEAP_GROWING_PERCENT overrides the bound for measurements (a whole number 1–1000);
 * "off" leaves V8's own policy. Anything else keeps HEAP_GROWING_PERCENT.
 */
export function heapGrowingPercentFromEnv(value = process.env.EIGENLENS_HEAP_GROWING_PERCENT): number | null {
  if (value === 'off') return null;
  const n = Number(value);
  return Number.isInteger(n) && n >= 1 && n <= 1000 ? n : HEAP_GROWING_PERCENT;
}

/** Applies the bound (by default HEAP_GROWING_PERCENT or the override); false when it is "off" or the engine refuses the flag (then V8's own policy stays). */
export function boundHeapGrowth(percent = heapGrowingPercentFromEnv()): boolean {
  if (percent === null) return false;
  try {
    setFlagsFromString(`--heap-growing-percent=${percent}`);
    return true;
  } catch {
    return false;
  }
}

/** Quiet time before collecting (ms): longer than a typing pause, shorter than a user notices. */
export const IDLE_COLLECT_MS = 2000;

let collector: (() => void) | null | undefined;

/** The engine's collector: `gc` if node runs with --expose-gc, else exposed for a fresh context. */
function collectorOf(): (() => void) | null {
  if (collector !== undefined) return collector;
  const exposed = (globalThis as { gc?: () => void }).gc;
  if (typeof exposed === 'function') return (collector = exposed);
  try {
    setFlagsFromString('--expose-gc');
    const fn = runInNewContext('gc') as unknown;
    collector = typeof fn === 'function' ? (fn as () => void) : null;
  } catch {
    collector = null;
  }
  return collector;
}

/**
 * The longest pause an idle collection may cost: a request arriving during it waits that long.
 * The collection is a full, compacting one and stops everything for about 2–2.5 ms per MB of
 * live heap (measured on Node 20 here: 42 ms at 17 MB, 195 ms at 91 MB, 481 ms at 191 MB),
 * so a heap expected to take longer is left to V8's own incremental collections.
 */
export const IDLE_COLLECT_MAX_PAUSE_MS = 200;
/** Pause per MB of live heap assumed until one collection was measured. */
const INITIAL_MS_PER_MB = 2.5;

export class IdleCollector {
  private timer: NodeJS.Timeout | null = null;
  private dirty = false;
  collections = 0;
  /** Quiet periods in which the heap was too large to collect within IDLE_COLLECT_MAX_PAUSE_MS. */
  skipped = 0;
  /** Measured pause per MB of live heap (the latest collection). */
  private msPerMB = INITIAL_MS_PER_MB;

  constructor(
    private readonly quietMs = IDLE_COLLECT_MS,
    private readonly maxPauseMs = IDLE_COLLECT_MAX_PAUSE_MS,
  ) {}

  /** Work happened: collect after the next quiet period. */
  touch(): void {
    this.dirty = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.run(), this.quietMs);
    // Never keep the process alive for this.
    this.timer.unref?.();
  }

  /** Work is pending: do not collect now (touch again when it is done). */
  cancel(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
  }

  private run(): void {
    this.timer = null;
    if (!this.dirty) return;
    this.dirty = false;
    const gc = collectorOf();
    if (!gc) return;
    const liveMB = process.memoryUsage().heapUsed / 2 ** 20;
    if (liveMB * this.msPerMB > this.maxPauseMs) {
      this.skipped++;
      return;
    }
    const started = performance.now();
    // A full collection frees the garbage; then "last-resort" (measured on Node 20: alone it
    // does nothing, after a full one it releases the freed pages to the system).
    // A full collection compacts only a few fragmented pages; the heap of a server that read
    // ten large files stayed about twice its live size. For this one idle collection every page
    // is compacted (V8's --compact-on-every-full-gc, switched on and off around it), so the
    // pages can be given back; during work, collections stay as V8 sizes them.
    let compacting = false;
    try {
      setFlagsFromString('--compact-on-every-full-gc');
      compacting = true;
    } catch {
      // An engine without the flag: an ordinary collection.
    }
    try {
      gc();
      (gc as (options?: object) => void)({ type: 'major', execution: 'sync', flavor: 'last-resort' });
    } finally {
      if (compacting) setFlagsFromString('--no-compact-on-every-full-gc');
    }
    this.msPerMB = Math.max(0.1, (performance.now() - started) / Math.max(1, liveMB));
    this.collections++;
  }
}
