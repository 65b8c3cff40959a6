/** Searching arrays kept in time order (readings, chart points). Pure. */

/** The first index whose time is at or after `t` (items sorted by `timeOf`); `items.length` when none. */
export function firstIndexAtOrAfter<T>(items: readonly T[], t: number, timeOf: (item: T) => number): number {
  let lo = 0;
  let hi = items.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (timeOf(items[mid]!) < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** The earliest and latest time among `items` (any order); Infinity / -Infinity when empty. */
export function timeSpan<T>(items: readonly T[], timeOf: (item: T) => number): { first: number; last: number } {
  let first = Infinity;
  let last = -Infinity;
  for (const item of items) {
    const t = timeOf(item);
    if (t < first) first = t;
    if (t > last) last = t;
  }
  return { first, last };
}
