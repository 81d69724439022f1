/** Nearest-rank percentile (p in 0..100) of `values`; NaN for an empty list. */
export function percentile(values: readonly number[], p: number): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const rank = Math.max(1, Math.ceil((p / 100) * sorted.length));
  return sorted[Math.min(rank, sorted.length) - 1]!;
}

/** p50/p95/p99 rounded to 0.1 ms, the shape every latency figure of the suite takes. */
export function latencySummary(values: readonly number[]): { p50: number; p95: number; p99: number; n: number } {
  const r = (x: number) => Math.round(x * 10) / 10;
  return { p50: r(percentile(values, 50)), p95: r(percentile(values, 95)), p99: r(percentile(values, 99)), n: values.length };
}
