/**
 * Per-minute rollup of a patient's readings, so long chart windows and their figures read one row
 * a minute instead of one a second. Pure: the server recomputes the minutes a write touched
 * (src/lib/server/queries/rollup.ts) and serves long windows from the rows.
 *
 * Each minute keeps the readings timed in it (counts, min / max / sum of SpO₂ and heart rate) and
 * the time the readings *carry* into it (each reading stands until the next or its source's
 * maximum gap, exactly as bandCompliance counts it): milliseconds per trusted SpO₂ value and
 * untrusted milliseconds. Band compliance for any band is then a sum over those values, exact but
 * for a band change inside a minute (counted with the band in force at the minute's start).
 */
import type { BandComplianceResult } from './compliance';
import { DEFAULT_COMPLIANCE_SETTINGS, type ComplianceSettings } from './settings';
import { trustedWith } from './trust';
import type { BandOrder, Reading } from './types';
import { maxGapMsFor, orderColumns } from './validate';

export const MINUTE_MS = 60_000;

export interface MinuteRollup {
  /** Minute start, epoch ms (UTC, whole minute). */
  minute: number;
  trustedN: number;
  untrustedN: number;
  chartedN: number;
  /** Trusted readings with SpO₂. */
  spo2N: number;
  spo2Min: number | null;
  spo2Max: number | null;
  spo2Sum: number;
  /** Untrusted readings that still carry an SpO₂ value (drawn hollow). */
  uSpo2N: number;
  uSpo2Min: number | null;
  uSpo2Max: number | null;
  uSpo2Sum: number;
  hrN: number;
  hrMin: number | null;
  hrMax: number | null;
  hrSum: number;
  /** Milliseconds of this minute carried by untrusted readings. */
  untrustedMs: number;
  /** Milliseconds of this minute carried by trusted readings, per SpO₂ value. */
  trustedMs: Map<number, number>;
}

export const floorMinute = (t: number) => Math.floor(t / MINUTE_MS) * MINUTE_MS;

function empty(minute: number): MinuteRollup {
  return {
    minute,
    trustedN: 0,
    untrustedN: 0,
    chartedN: 0,
    spo2N: 0,
    spo2Min: null,
    spo2Max: null,
    spo2Sum: 0,
    uSpo2N: 0,
    uSpo2Min: null,
    uSpo2Max: null,
    uSpo2Sum: 0,
    hrN: 0,
    hrMin: null,
    hrMax: null,
    hrSum: 0,
    untrustedMs: 0,
    trustedMs: new Map(),
  };
}

const lo = (a: number | null, b: number) => (a === null || b < a ? b : a);
const hi = (a: number | null, b: number) => (a === null || b > a ? b : a);

/**
 * Minutes in [fromMinute, toMinute) from readings sorted by time. Pass the last reading before
 * `fromMinute` too (its carry may reach into the range); readings outside the range add only
 * their carry. Minutes with nothing in them are left out.
 */
export function minuteRollup(
  readings: readonly Reading[],
  fromMinute: number,
  toMinute: number,
  s: Partial<ComplianceSettings> = {},
): MinuteRollup[] {
  const cfg = { ...DEFAULT_COMPLIANCE_SETTINGS, ...s };
  const chartedMs = cfg.chartedMaxGapMin * MINUTE_MS;
  const deviceMs = cfg.deviceMaxGapMin * MINUTE_MS;
  const importMs = cfg.importMaxGapMin * MINUTE_MS;
  const byMinute = new Map<number, MinuteRollup>();
  const get = (m: number) => {
    let row = byMinute.get(m);
    if (!row) {
      row = empty(m);
      byMinute.set(m, row);
    }
    return row;
  };
  for (let i = 0; i < readings.length; i++) {
    const r = readings[i]!;
    const trusted = trustedWith(r, cfg.minPerfusionIndexPct, i);
    if (r.at >= fromMinute && r.at < toMinute) {
      const row = get(floorMinute(r.at));
      if (trusted) row.trustedN++;
      else row.untrustedN++;
      if (r.source === 'charted') row.chartedN++;
      if (r.spo2 !== null) {
        if (trusted) {
          row.spo2N++;
          row.spo2Sum += r.spo2;
          row.spo2Min = lo(row.spo2Min, r.spo2);
          row.spo2Max = hi(row.spo2Max, r.spo2);
        } else {
          row.uSpo2N++;
          row.uSpo2Sum += r.spo2;
          row.uSpo2Min = lo(row.uSpo2Min, r.spo2);
          row.uSpo2Max = hi(row.uSpo2Max, r.spo2);
        }
      }
      if (r.heartRate !== null && r.heartRate !== undefined) {
        row.hrN++;
        row.hrSum += r.heartRate;
        row.hrMin = lo(row.hrMin, r.heartRate);
        row.hrMax = hi(row.hrMax, r.heartRate);
      }
    }
    // The reading's carry, split across minutes and clipped to the range.
    let end = r.at + maxGapMsFor(r.source, chartedMs, deviceMs, importMs, i);
    const next = readings[i + 1];
    if (next && next.at < end) end = next.at;
    let a = Math.max(r.at, fromMinute);
    end = Math.min(end, toMinute);
    while (a < end) {
      const m = floorMinute(a);
      const b = Math.min(end, m + MINUTE_MS);
      const row = get(m);
      if (trusted) row.trustedMs.set(r.spo2!, (row.trustedMs.get(r.spo2!) ?? 0) + (b - a));
      else row.untrustedMs += b - a;
      a = b;
    }
  }
  return [...byMinute.values()].sort((x, y) => x.minute - y.minute);
}

/** "94:30000,95:30000": the per-value carry as stored in one column. */
export function encodeTrustedMs(m: Map<number, number>): string {
  return [...m]
    .sort((a, b) => a[0] - b[0])
    .map(([v, ms]) => `${v}:${Math.round(ms)}`)
    .join(',');
}

export function decodeTrustedMs(text: string | null): Map<number, number> {
  const out = new Map<number, number>();
  if (!text) return out;
  for (const pair of text.split(',')) {
    const [v, ms] = pair.split(':');
    out.set(Number(v), Number(ms));
  }
  return out;
}

/**
 * Band compliance over whole minutes [from, to) from rollup rows (sorted). Same six totals as
 * bandCompliance; a band change inside a minute counts from the next minute (at most one minute
 * per order change).
 */
export function complianceFromMinutes(
  rows: readonly MinuteRollup[],
  orders: readonly BandOrder[],
  window: { from: number; to: number },
): BandComplianceResult {
  const cols = orderColumns(orders);
  let k = -1;
  let inMs = 0,
    belowMs = 0,
    aboveMs = 0,
    untrustedMs = 0,
    burden = 0,
    trustedReadings = 0,
    untrustedReadings = 0,
    carried = 0;
  for (const row of rows) {
    if (row.minute < window.from || row.minute >= window.to) continue;
    while (k + 1 < cols.from.length && cols.from[k + 1]! <= row.minute) k++;
    trustedReadings += row.trustedN;
    untrustedReadings += row.untrustedN;
    if (k < 0) continue; // before the first order: "no band", counted below
    let rowMs = row.untrustedMs;
    for (const ms of row.trustedMs.values()) rowMs += ms;
    untrustedMs += row.untrustedMs;
    carried += rowMs;
    const low = cols.low[k]!;
    const high = cols.high[k]!;
    for (const [v, ms] of row.trustedMs) {
      if (v < low) {
        belowMs += ms;
        burden += (low - v) * ms;
      } else if (v > high) aboveMs += ms;
      else inMs += ms;
    }
  }
  // Time before the first order is "no band" whether or not readings carried it.
  const firstOrder =
    cols.from.length > 0 ? floorMinute(cols.from[0]!) + (cols.from[0]! % MINUTE_MS === 0 ? 0 : MINUTE_MS) : Infinity;
  const noBandEnd = Math.min(Math.max(firstOrder, window.from), window.to);
  const noBandMs = noBandEnd - window.from;
  const windowMs = window.to - window.from;
  const noReadingMs = Math.max(0, windowMs - noBandMs - carried);
  const scored = inMs + belowMs + aboveMs;
  return {
    inBandMin: inMs / MINUTE_MS,
    belowMin: belowMs / MINUTE_MS,
    aboveMin: aboveMs / MINUTE_MS,
    untrustedMin: untrustedMs / MINUTE_MS,
    noReadingMin: noReadingMs / MINUTE_MS,
    noBandMin: noBandMs / MINUTE_MS,
    burdenPctMin: burden / MINUTE_MS,
    windowMin: windowMs / MINUTE_MS,
    timeInBandPct: scored > 0 ? (inMs / scored) * 100 : null,
    trustedReadings,
    untrustedReadings,
  };
}

/** Adds two compliance results over adjacent windows. */
export function addCompliance(a: BandComplianceResult, b: BandComplianceResult): BandComplianceResult {
  const inBandMin = a.inBandMin + b.inBandMin;
  const belowMin = a.belowMin + b.belowMin;
  const aboveMin = a.aboveMin + b.aboveMin;
  const scored = inBandMin + belowMin + aboveMin;
  return {
    inBandMin,
    belowMin,
    aboveMin,
    untrustedMin: a.untrustedMin + b.untrustedMin,
    noReadingMin: a.noReadingMin + b.noReadingMin,
    noBandMin: a.noBandMin + b.noBandMin,
    burdenPctMin: a.burdenPctMin + b.burdenPctMin,
    windowMin: a.windowMin + b.windowMin,
    timeInBandPct: scored > 0 ? (inBandMin / scored) * 100 : null,
    trustedReadings: a.trustedReadings + b.trustedReadings,
    untrustedReadings: a.untrustedReadings + b.untrustedReadings,
  };
}

/** One drawn point of a line: mean with its min–max envelope over a bucket of time. */
export interface EnvelopePoint {
  t: number;
  v: number;
  lo: number;
  hi: number;
  n: number;
  trusted: boolean;
  charted: boolean;
}

/**
 * Buckets rollup minutes into at most `maxPoints` points per line over [from, to): each bucket
 * gives its mean with the min and max, so a run below band shows as a low envelope whatever the
 * signal's shape. A bucket with only untrusted SpO₂ gives an untrusted point.
 */
export function envelopeLines(
  rows: readonly MinuteRollup[],
  from: number,
  to: number,
  maxPoints: number,
): { spo2: EnvelopePoint[]; heartRate: EnvelopePoint[]; bucketMs: number } {
  const minutes = Math.max(1, Math.ceil((to - from) / MINUTE_MS));
  const bucketMs = Math.ceil(minutes / maxPoints) * MINUTE_MS;
  const start = floorMinute(from);
  const spo2: EnvelopePoint[] = [];
  const heartRate: EnvelopePoint[] = [];
  let i = 0;
  while (i < rows.length && rows[i]!.minute < start) i++;
  for (let b = start; b < to && i < rows.length; b += bucketMs) {
    const end = b + bucketMs;
    const acc = empty(b);
    let any = false;
    for (; i < rows.length && rows[i]!.minute < end; i++) {
      const r = rows[i]!;
      any = true;
      acc.chartedN += r.chartedN;
      acc.trustedN += r.trustedN;
      acc.untrustedN += r.untrustedN;
      if (r.spo2N) {
        acc.spo2N += r.spo2N;
        acc.spo2Sum += r.spo2Sum;
        acc.spo2Min = lo(acc.spo2Min, r.spo2Min!);
        acc.spo2Max = hi(acc.spo2Max, r.spo2Max!);
      }
      if (r.uSpo2N) {
        acc.uSpo2N += r.uSpo2N;
        acc.uSpo2Sum += r.uSpo2Sum;
        acc.uSpo2Min = lo(acc.uSpo2Min, r.uSpo2Min!);
        acc.uSpo2Max = hi(acc.uSpo2Max, r.uSpo2Max!);
      }
      if (r.hrN) {
        acc.hrN += r.hrN;
        acc.hrSum += r.hrSum;
        acc.hrMin = lo(acc.hrMin, r.hrMin!);
        acc.hrMax = hi(acc.hrMax, r.hrMax!);
      }
    }
    if (!any) continue;
    const readings = acc.trustedN + acc.untrustedN;
    const charted = readings > 0 && acc.chartedN === readings;
    const t = b + bucketMs / 2 > to ? b : b + Math.floor(bucketMs / 2);
    if (acc.spo2N > 0)
      spo2.push({
        t,
        v: round1(acc.spo2Sum / acc.spo2N),
        lo: acc.spo2Min!,
        hi: acc.spo2Max!,
        n: acc.spo2N,
        trusted: true,
        charted,
      });
    else if (acc.uSpo2N > 0)
      spo2.push({
        t,
        v: round1(acc.uSpo2Sum / acc.uSpo2N),
        lo: acc.uSpo2Min!,
        hi: acc.uSpo2Max!,
        n: acc.uSpo2N,
        trusted: false,
        charted,
      });
    if (acc.hrN > 0)
      heartRate.push({
        t,
        v: round1(acc.hrSum / acc.hrN),
        lo: acc.hrMin!,
        hi: acc.hrMax!,
        n: acc.hrN,
        trusted: true,
        charted,
      });
  }
  return { spo2, heartRate, bucketMs };
}

const round1 = (v: number) => Math.round(v * 10) / 10;
