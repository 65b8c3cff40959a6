import { ComputationInputError } from './errors';
import { DEFAULT_TRUST_SETTINGS, resolveSettings, type TrustSettings } from './settings';
import { trustedWith } from './trust';
import type { BandOrder, Reading } from './types';
import { orderColumns, sortedUpTo } from './validate';

/**
 * Largest-triangle-three-buckets downsampling (Steinarsson, "Downsampling time series for visual
 * representation", MSc thesis, University of Iceland, 2013).
 *
 * Keeps the first and last points and one point per bucket — the one forming the largest triangle
 * with the point kept in the previous bucket and the average of the next bucket. Points for which
 * `keep(p, i)` is true are always kept as well: LTTB runs with the budget that remains
 * (threshold − kept) and the kept points are merged in, so the result has at most `threshold`
 * points — unless more points must be kept than that, when the result is first + kept + last.
 *
 * Returns the original objects in their original order. `threshold` ≥ n returns a copy of all
 * points. Throws ComputationInputError for a threshold under 3 or not whole, non-finite x or y,
 * or x going backwards.
 */
export function lttb<T>(
  points: readonly T[],
  threshold: number,
  x: (p: T) => number,
  y: (p: T) => number,
  keep?: (p: T, i: number) => boolean,
): T[] {
  if (!Number.isInteger(threshold) || threshold < 3) {
    throw new ComputationInputError('threshold', 'must be a whole number of at least 3', threshold);
  }
  const n = points.length;
  // One pass to validate and pull x and y into typed arrays: the bucket loops then touch numbers only.
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  let prevX = -Infinity;
  for (let i = 0; i < n; i++) {
    const p = points[i]!;
    const px = x(p);
    const py = y(p);
    if (!(px >= prevX && px - px === 0))
      throw new ComputationInputError(`points[${i}].x`, 'must be finite and not decreasing', px);
    if (!(py - py === 0)) throw new ComputationInputError(`points[${i}].y`, 'must be finite', py);
    xs[i] = px;
    ys[i] = py;
    prevX = px;
  }
  if (n <= threshold) return points.slice();

  const kept: number[] = [];
  if (keep !== undefined) {
    for (let i = 1; i < n - 1; i++) if (keep(points[i]!, i)) kept.push(i);
  }
  const budget = threshold - kept.length;
  if (budget < 3) {
    const out: T[] = [points[0]!];
    for (const i of kept) out.push(points[i]!);
    out.push(points[n - 1]!);
    return out;
  }

  const chosen = lttbIndices(xs, ys, budget);
  if (kept.length === 0) return Array.from(chosen, (i) => points[i]!);
  // Merge two ascending index lists, dropping duplicates.
  const out: T[] = [];
  let a = 0;
  let b = 0;
  let last = -1;
  while (a < chosen.length || b < kept.length) {
    const next = b >= kept.length || (a < chosen.length && chosen[a]! <= kept[b]!) ? chosen[a++]! : kept[b++]!;
    if (next !== last) out.push(points[next]!);
    last = next;
  }
  return out;
}

/** Indices chosen by plain LTTB for `threshold` ≥ 3 points out of n > threshold. */
function lttbIndices(xs: Float64Array, ys: Float64Array, threshold: number): Int32Array {
  const n = xs.length;
  const out = new Int32Array(threshold);
  const every = (n - 2) / (threshold - 2);
  let a = 0;
  out[0] = 0;
  for (let bucket = 0; bucket < threshold - 2; bucket++) {
    const nextStart = Math.floor((bucket + 1) * every) + 1;
    const nextEnd = Math.min(Math.floor((bucket + 2) * every) + 1, n);
    let avgX = 0;
    let avgY = 0;
    for (let j = nextStart; j < nextEnd; j++) {
      avgX += xs[j]!;
      avgY += ys[j]!;
    }
    const count = nextEnd - nextStart;
    avgX /= count;
    avgY /= count;

    const start = Math.floor(bucket * every) + 1;
    const end = Math.floor((bucket + 1) * every) + 1;
    const ax = xs[a]!;
    const ay = ys[a]!;
    let maxArea = -1;
    let chosen = start;
    for (let j = start; j < end; j++) {
      const area = Math.abs((ax - avgX) * (ys[j]! - ay) - (ax - xs[j]!) * (avgY - ay));
      if (area > maxArea) {
        maxArea = area;
        chosen = j;
      }
    }
    out[bucket + 1] = chosen;
    a = chosen;
  }
  out[threshold - 1] = n - 1;
  return out;
}

/**
 * Flags the readings that start or end a below-band run: the first and last trusted reading under
 * the lower limit of the order in force, where a run is ended by a trusted reading that is not
 * below band or by an order change that leaves it in band. Untrusted readings neither start, end
 * nor break a run (as in detectConcerns). Readings before the first order are never flagged.
 */
export function belowBandRunEdges(
  readings: readonly Reading[],
  orders: readonly BandOrder[],
  s?: Partial<TrustSettings>,
): Uint8Array {
  const cfg = resolveSettings(DEFAULT_TRUST_SETTINGS, s, 'trustSettings');
  const cols = orderColumns(orders);
  const flags = new Uint8Array(readings.length);
  let k = -1;
  let nextFrom = cols.from.length > 0 ? cols.from[0]! : Infinity;
  let low = NaN;
  let runLast = -1; // last trusted below-band reading of the open run
  sortedUpTo(readings);
  for (let i = 0; i < readings.length; i++) {
    const r = readings[i]!;
    const at = r.at;
    while (at >= nextFrom) {
      k++;
      low = cols.low[k]!;
      nextFrom = k + 1 < cols.from.length ? cols.from[k + 1]! : Infinity;
    }
    if (!trustedWith(r, cfg.minPerfusionIndexPct, i)) continue;
    const below = k >= 0 && (r.spo2 as number) < low;
    if (below) {
      if (runLast < 0) flags[i] = 1;
      runLast = i;
    } else if (runLast >= 0) {
      flags[runLast] = 1;
      runLast = -1;
    }
  }
  if (runLast >= 0) flags[runLast] = 1;
  return flags;
}

/** A `keep` predicate for lttb that keeps the edges of every below-band run (see belowBandRunEdges). */
export function keepBelowBandRunEdges(
  readings: readonly Reading[],
  orders: readonly BandOrder[],
  s?: Partial<TrustSettings>,
): (p: Reading, i: number) => boolean {
  const flags = belowBandRunEdges(readings, orders, s);
  return (_p, i) => flags[i] === 1;
}
