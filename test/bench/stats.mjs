// Order statistics for timings. Percentiles use the nearest-rank definition (common
// practice for latency figures): the p-th percentile is the ceil(p/100·N)-th smallest value.
export function percentile(values, p) {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const rank = Math.max(1, Math.ceil((p / 100) * sorted.length));
  return sorted[rank - 1];
}

export function summary(values) {
  return {
    runs: values.length,
    median: percentile(values, 50),
    p95: percentile(values, 95),
    min: values.length ? Math.min(...values) : NaN,
    max: values.length ? Math.max(...values) : NaN,
  };
}

/** Milliseconds rounded for display: 3 significant digits, at least 3 decimals below 1 ms. */
export function ms(x) {
  if (!Number.isFinite(x)) return String(x);
  if (x < 1) return x.toFixed(3);
  if (x < 100) return x.toPrecision(3);
  return x.toFixed(0);
}
