/** Runs a stepwise computation (a generator whose steps are units of work) to its result. */
export function runToEnd<T>(steps: Generator<unknown, T, void>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}
