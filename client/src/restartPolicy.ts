/**
 * Crash-restart budget for the language server: a sliding window of recent restarts.
 *
 * Why: a server that crashes on one document would otherwise be restarted forever, each
 * restart re-reading the same document and crashing again. After `maxRestarts` crashes
 * within `windowMs` we stop and tell the user (common practice in editor clients; the
 * numbers are ours: 4 restarts in 3 minutes).
 *
 * Invariant: `restartTimes` holds only the times of restarts granted within the last
 * `windowMs`, oldest first, and never more than `maxRestarts` entries.
 *
 * Free of any editor API so it can be tested directly.
 */
export interface RestartBudgetOptions {
  maxRestarts: number;
  windowMs: number;
}

export const DEFAULT_RESTART_BUDGET: RestartBudgetOptions = { maxRestarts: 4, windowMs: 3 * 60_000 };

export type RestartDecision =
  | { restart: true; usedInWindow: number }
  | { restart: false; crashesInWindow: number };

export class RestartBudget {
  private restartTimes: number[] = [];

  constructor(private readonly options: RestartBudgetOptions = DEFAULT_RESTART_BUDGET) {}

  /** Call when the server connection closed unexpectedly; says whether to start it again. */
  onCrash(nowMs: number): RestartDecision {
    this.restartTimes = this.restartTimes.filter((t) => nowMs - t < this.options.windowMs);
    if (this.restartTimes.length >= this.options.maxRestarts) {
      return { restart: false, crashesInWindow: this.restartTimes.length + 1 };
    }
    this.restartTimes.push(nowMs);
    return { restart: true, usedInWindow: this.restartTimes.length };
  }

  /** A restart asked for by the user starts a fresh budget. */
  reset(): void {
    this.restartTimes = [];
  }
}
