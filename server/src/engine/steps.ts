/** Runs a stepwise computation (a generator whose steps are units of work) to its result. */
export function runToEnd<T>(steps: Generator<unknown, T, void>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}

/** A value, or the result of a stepwise computation of it (its steps passed on). */
export function* stepsOrValue<T>(x: T | Generator<number, T, void>): Generator<number, T, void> {
  if (typeof (x as { next?: unknown })?.next === 'function' && typeof (x as { [Symbol.iterator]?: unknown })[Symbol.iterator] === 'function') return yield* (x as Generator<number, T, void>);
  return x as T;
}
