/**
 * The handover sheet's judgements for one patient over one shift, from the computation modules
 * (band compliance, trust, NEWS2). Pure: rows come in already shaped, the clock is passed in.
 */
import {
  bandCompliance,
  isTrusted,
  news2,
  type BandOrder,
  type OxygenDevice,
  type Reading,
} from '~/lib/oxygenation/index.ts';
import { news2InputOf, type ChartedObs } from '~/lib/charting/charted-obs.ts';

export type ChartedSet = ChartedObs;

export interface News2Figure {
  total: number | null;
  complete: boolean;
  missing: string[];
  response: string | null;
  at: number;
}

/** NEWS2 of the newest charted set at or before `at`, or null when none was charted before it. */
export function news2At(charted: readonly ChartedSet[], at: number, scale: 1 | 2): News2Figure | null {
  let newest: ChartedSet | undefined;
  for (const c of charted) if (c.at <= at && (!newest || c.at >= newest.at)) newest = c;
  if (!newest) return null;
  const r = news2(news2InputOf(newest), scale);
  return { total: r.total, complete: r.complete, missing: [...r.missing], response: r.response, at: newest.at };
}

/** The lowest trusted SpO₂ timed inside [from, to), the earliest when tied. */
export function lowestTrusted(
  readings: readonly Reading[],
  from: number,
  to: number,
): { spo2: number; at: number } | null {
  let low: { spo2: number; at: number } | null = null;
  for (const r of readings) {
    if (r.at < from || r.at >= to || r.spo2 === null || !isTrusted(r)) continue;
    if (!low || r.spo2 < low.spo2) low = { spo2: r.spo2, at: r.at };
  }
  return low;
}

export interface OxygenState {
  device: OxygenDevice | null;
  fio2: number | null;
  fio2Estimated: boolean;
  at: number;
}

/**
 * Oxygen device and FiO₂ in force at the shift start, now, and each change between (readings that
 * carry a device or an FiO₂ only).
 */
export function oxygenCourse(
  readings: readonly Reading[],
  from: number,
  to: number,
): { atStart: OxygenState | null; now: OxygenState | null; changes: OxygenState[] } {
  let current: OxygenState | null = null;
  let atStart: OxygenState | null = null;
  const changes: OxygenState[] = [];
  for (const r of readings) {
    if (r.at >= to) break;
    if ((r.device ?? null) === null && (r.fio2 ?? null) === null) continue;
    const next: OxygenState = {
      device: r.device ?? current?.device ?? null,
      fio2: r.fio2 ?? current?.fio2 ?? null,
      fio2Estimated: Boolean(r.fio2Estimated),
      at: r.at,
    };
    if (r.at < from) {
      current = next;
      continue;
    }
    if (atStart === null && current !== null) atStart = current;
    if (!current || current.device !== next.device || current.fio2 !== next.fio2) changes.push(next);
    current = next;
  }
  if (atStart === null && current !== null && current.at < from) atStart = current;
  // The first state seen in the shift is a change only when something was in force before it.
  if (atStart === null && changes.length > 0) changes.shift();
  return { atStart, now: current, changes };
}

export interface ShiftCompliance {
  inBandMin: number;
  belowMin: number;
  untrustedMin: number;
  timeInBandPct: number | null;
  windowMin: number;
}

export function shiftCompliance(
  readings: readonly Reading[],
  orders: readonly BandOrder[],
  from: number,
  to: number,
): ShiftCompliance {
  const c = bandCompliance(readings, orders, { from, to });
  return {
    inBandMin: c.inBandMin,
    belowMin: c.belowMin,
    untrustedMin: c.untrustedMin,
    timeInBandPct: c.timeInBandPct,
    windowMin: c.windowMin,
  };
}

/** Whole minutes between two times, or null when the second has not happened. */
export function minutesBetween(a: number, b: number | null): number | null {
  return b === null ? null : Math.round((b - a) / 60_000);
}
