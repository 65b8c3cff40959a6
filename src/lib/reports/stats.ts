/**
 * Quantiles for response times: linear interpolation between the closest ranks (h = (n − 1)·p,
 * the "type 7" definition used by R and by most spreadsheets). Empty input gives null.
 */
export function quantile(values: readonly number[], p: number): number | null {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`quantile p must be in 0–1, got ${p}`);
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.ceil(h);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

export interface Spread {
  n: number;
  median: number | null;
  p90: number | null;
}

export function spread(values: readonly number[]): Spread {
  return { n: values.length, median: quantile(values, 0.5), p90: quantile(values, 0.9) };
}
