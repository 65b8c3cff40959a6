/** What the bed chart shows at one moment (hover or keyboard cursor): every line's value then. */
import { firstIndexAtOrAfter } from '~/lib/sorted.ts';
import type { BandSegment, Fio2Step, SeriesPoint, SeriesResponse, Spo2Point } from './api-types.ts';

export interface ValuesAt {
  t: number;
  spo2: Spo2Point | null;
  heartRate: SeriesPoint | null;
  fio2: Fio2Step | null;
  band: BandSegment | null;
}

/** The point nearest `t` within `maxMs` (points sorted by time), or null. */
export function nearest<P extends { t: number }>(points: readonly P[], t: number, maxMs: number): P | null {
  const lo = firstIndexAtOrAfter(points, t, (p) => p.t);
  let best: P | null = null;
  for (const i of [lo - 1, lo]) {
    const p = points[i];
    if (p && Math.abs(p.t - t) <= maxMs && (!best || Math.abs(p.t - t) < Math.abs(best.t - t))) best = p;
  }
  return best;
}

/** The step in force at `t` (the last step at or before it). */
export function stepAt<P extends { t: number }>(steps: readonly P[], t: number): P | null {
  let found: P | null = null;
  for (const s of steps) {
    if (s.t <= t) found = s;
    else break;
  }
  return found;
}

export function bandIn(bands: readonly BandSegment[], t: number): BandSegment | null {
  for (const b of bands) if (t >= b.from && t < b.to) return b;
  const last = bands[bands.length - 1];
  return last && t === last.to ? last : null;
}

/**
 * Values at `t`: the nearest SpO₂ and heart-rate points (within a bucket, or 5 min of raw points —
 * further than that the chart shows no reading), the FiO₂ step and the band in force.
 */
export function valuesAt(s: SeriesResponse, t: number): ValuesAt {
  const reach = Math.max(s.bucketMs, 5 * 60_000);
  return {
    t,
    spo2: nearest(s.spo2, t, reach),
    heartRate: nearest(s.heartRate, t, reach),
    fio2: stepAt(s.fio2, t),
    band: bandIn(s.bands, t),
  };
}
