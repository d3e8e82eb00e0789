/**
 * Full garbage collections once the server has nothing to do.
 *
 * Analysing a large document allocates far more than it keeps (spectra, closed forms being
 * checked, report rebuilds), and V8 sizes its heap to that allocation rate; left alone, an
 * idle server keeps the high-water heap resident for a long time. So when the work queue is
 * empty for a while, the server asks for two incremental full collections: the first frees
 * the garbage, the second compacts every page so V8 can return the emptied ones. Both mark in
 * steps, but on an idle process each still holds the event loop at its end, for about 1 ms per
 * MB of heap in use (the first) and 2–3 ms per MB of live heap (the second); each is left out
 * when that would be over IDLE_COLLECT_MAX_PAUSE_MS (the rates are measured at every run).
 * They run at most once per quiet period, never while a document is being analysed, and not
 * at all when the runtime refuses to expose a collector.
 *
 * Measured on Node 20 here (ten 5,000-line files open, npm run bench): resident memory after
 * the quiet period 256 MB with one synchronous collection (skipped there, as the heap was too
 * large for the pause bound) and 183–191 MB with these two, whose final pause was 90–106 ms.
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

function isThenable(x: unknown): x is Promise<unknown> {
  return typeof (x as { then?: unknown } | null)?.then === 'function';
}

function setFlag(flag: string): boolean {
  try {
    setFlagsFromString(flag);
    return true;
  } catch {
    return false;
  }
}

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
 * The longest pause the compacting collection may cost: a request arriving during it waits
 * that long. Moving the live objects cannot be split into steps; it stops everything for about
 * 2–3 ms per MB of live heap (measured on Node 20 here: 42 ms at 17 MB, 195 ms at 91 MB,
 * 481 ms at 191 MB), so a larger heap is only collected, not compacted.
 */
export const IDLE_COLLECT_MAX_PAUSE_MS = 200;
/** Pause per MB of live heap assumed until one compaction was measured. */
const INITIAL_MS_PER_MB = 2.5;
/** Pause per MB of heap in use assumed until one incremental collection was measured (measured here: 0.9–1.1). */
const INITIAL_MARK_MS_PER_MB = 1.2;

export class IdleCollector {
  private timer: NodeJS.Timeout | null = null;
  private dirty = false;
  /** A collection is under way. */
  private running = false;
  /** The quiet period ended during a collection: start another quiet period after it. */
  private rearm = false;
  collections = 0;
  /** Quiet periods in which the live heap was too large to compact within IDLE_COLLECT_MAX_PAUSE_MS (it was only collected). */
  skipped = 0;
  /** Longest hold of the event loop per MB of live heap in the latest compacting collection. */
  private msPerMB = INITIAL_MS_PER_MB;
  /** Longest hold per MB of heap in use (garbage included) in the latest incremental collection. */
  private markMsPerMB = INITIAL_MARK_MS_PER_MB;

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
    this.rearm = false;
  }

  private run(): void {
    this.timer = null;
    if (this.running) {
      this.rearm = this.dirty;
      return;
    }
    if (!this.dirty) return;
    this.dirty = false;
    const gc = collectorOf();
    if (!gc) return;
    // Even an incremental collection of an idle process holds the event loop for a while at its
    // end (measured here: about 1 ms per MB of heap in use before it, 90–280 ms): over the pause
    // bound, the quiet period passes without a collection and V8 collects as it sees fit.
    const usedMB = process.memoryUsage().heapUsed / 2 ** 20;
    if (usedMB * this.markMsPerMB > this.maxPauseMs) {
      this.skipped++;
      return;
    }
    const started = performance.now();
    const probe = new LoopProbe();
    // First an incremental collection: V8 marks in steps between tasks. It frees the garbage but
    // leaves the heap's pages fragmented, so little memory goes back to the system.
    const marking = (gc as (options?: object) => unknown)({ type: 'major', execution: 'async' });
    if (!isThenable(marking)) {
      // An engine whose collector takes no options collected synchronously just now.
      probe.stop();
      this.collections++;
      return;
    }
    this.running = true;
    void marking.then(
      () => {
        this.markMsPerMB = Math.max(0.3, probe.stop() / Math.max(1, usedMB));
        // Then, when what is left is small enough to move within the pause bound, a second
        // incremental collection that compacts every page (V8's --compact-on-every-full-gc,
        // switched on around it), so that the emptied pages are given back. Moving the live
        // objects is the part that cannot be split; it costs about msPerMB per MB of them.
        const liveMB = process.memoryUsage().heapUsed / 2 ** 20;
        if (this.dirty || liveMB * this.msPerMB > this.maxPauseMs || !setFlag('--compact-on-every-full-gc')) {
          if (liveMB * this.msPerMB > this.maxPauseMs) this.skipped++;
          this.finish(started, `incremental over ${usedMB.toFixed(0)} MB`);
          return;
        }
        const moving = new LoopProbe();
        const compacting = (gc as (options?: object) => unknown)({ type: 'major', execution: 'async' });
        const done = () => {
          setFlag('--no-compact-on-every-full-gc');
          this.msPerMB = Math.max(0.3, moving.stop() / Math.max(1, liveMB));
          this.finish(started, `incremental over ${usedMB.toFixed(0)} MB, then compacting ${liveMB.toFixed(0)} MB`);
        };
        if (isThenable(compacting)) void compacting.then(done, done);
        else done();
      },
      () => {
        probe.stop();
        this.finish(started, 'failed');
      },
    );
  }

  private finish(started: number, what: string): void {
    this.running = false;
    this.collections++;
    // Work came and went during the collection, and its quiet timer found this one running.
    if (this.rearm) {
      this.rearm = false;
      this.touch();
    }
    if (process.env.EIGENLENS_TRACE) process.stderr.write(`idle collection (${what}) took ${(performance.now() - started).toFixed(0)} ms\n`);
  }
}

/** The longest the event loop was held while it ran: a 5 ms timer that notes how late it fires. */
class LoopProbe {
  private longest = 0;
  private last = performance.now();
  private readonly timer = setInterval(() => {
    const now = performance.now();
    this.longest = Math.max(this.longest, now - this.last);
    this.last = now;
  }, 5);
  constructor() {
    this.timer.unref?.();
  }
  /** Stops it; the longest hold in ms, counting the one up to now. */
  stop(): number {
    clearInterval(this.timer);
    return Math.max(this.longest, performance.now() - this.last);
  }
}

