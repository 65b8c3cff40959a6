import { trustedWith } from './trust';
import { DEFAULT_COMPLIANCE_SETTINGS, resolveSettings, type ComplianceSettings } from './settings';
import type { BandOrder, Reading, TimeWindow } from './types';
import { checkTime, maxGapMsFor, orderColumns, validateWindow } from './validate';

const MS_PER_MIN = 60_000;

export interface BandComplianceResult {
  /** Trusted readings inside the band in force (low ≤ SpO₂ ≤ high). */
  inBandMin: number;
  /** Trusted readings under the band's lower limit. */
  belowMin: number;
  /** Trusted readings over the band's upper limit. */
  aboveMin: number;
  /** Time carried by untrusted readings (poor trace, low perfusion, no SpO₂ value). */
  untrustedMin: number;
  /** Time with a band in force but no reading carrying forward. */
  noReadingMin: number;
  /** Time before the first order: no band to compare with, whatever the readings. */
  noBandMin: number;
  /** Hypoxaemic burden: area between the lower limit and trusted SpO₂ under it, %·min; never negative. */
  burdenPctMin: number;
  /** Length of the window; equals the sum of the six minute totals above. */
  windowMin: number;
  /** inBand / (inBand + below + above) × 100, or null when no trusted time was in force. */
  timeInBandPct: number | null;
  /** Readings timed inside the window that were trusted / untrusted. */
  trustedReadings: number;
  untrustedReadings: number;
}

/**
 * Splits a time span across the orders in force and adds it to the right total. Spans arrive in
 * time order, so the order pointer only moves forward (one pass over orders for the whole call).
 */
class Tally {
  inMs = 0;
  belowMs = 0;
  aboveMs = 0;
  untrustedMs = 0;
  noReadingMs = 0;
  noBandMs = 0;
  burden = 0;
  private k = -1;
  private nextFrom: number;
  private low = 0;
  private high = 0;

  constructor(
    private readonly froms: Float64Array,
    private readonly lows: Float64Array,
    private readonly highs: Float64Array,
  ) {
    this.nextFrom = froms.length > 0 ? froms[0]! : Infinity;
  }

  /** kind: 0 no reading, 1 untrusted, 2 trusted with `spo2`. */
  add(a: number, b: number, kind: number, spo2: number): void {
    while (a < b) {
      while (a >= this.nextFrom) {
        const k = ++this.k;
        this.low = this.lows[k]!;
        this.high = this.highs[k]!;
        this.nextFrom = k + 1 < this.froms.length ? this.froms[k + 1]! : Infinity;
      }
      const end = Math.min(b, this.nextFrom);
      const d = end - a;
      if (this.k < 0) this.noBandMs += d;
      else if (kind === 0) this.noReadingMs += d;
      else if (kind === 1) this.untrustedMs += d;
      else if (spo2 < this.low) {
        this.belowMs += d;
        this.burden += (this.low - spo2) * d;
      } else if (spo2 > this.high) this.aboveMs += d;
      else this.inMs += d;
      a = end;
    }
  }
}

/**
 * Time in band, below and above band, and hypoxaemic burden over a window.
 *
 * - Each reading stands from its time until the next reading or its source's maximum gap
 *   (settings: 75 min charted, 2 min device/import), whichever comes first. Readings before the
 *   window carry into it; readings at or after `window.to` are not examined.
 * - Time is counted in exactly one of six totals that add up to the window: no band (before the
 *   first order — this takes precedence, since with no target there is nothing to judge),
 *   no reading, untrusted, in band, below, above. Orders changing inside a reading's span split
 *   the span at the change.
 * - Burden = Σ (lower limit − SpO₂) × minutes over trusted time below band, %·min.
 *
 * Single pass, no allocation per reading, no Date objects. Throws ComputationInputError (with the
 * array index) for unsorted or non-finite times, SpO₂ outside 0–100, unknown trace or source,
 * bad orders or window. Empty readings give a window of no-reading (or no-band) time.
 */
export function bandCompliance(
  readings: readonly Reading[],
  orders: readonly BandOrder[],
  window: TimeWindow,
  s?: Partial<ComplianceSettings>,
): BandComplianceResult {
  const cfg = resolveSettings(DEFAULT_COMPLIANCE_SETTINGS, s, 'complianceSettings');
  validateWindow(window);
  const cols = orderColumns(orders);
  const from = window.from;
  const to = window.to;
  const chartedMs = cfg.chartedMaxGapMin * MS_PER_MIN;
  const deviceMs = cfg.deviceMaxGapMin * MS_PER_MIN;
  const importMs = cfg.importMaxGapMin * MS_PER_MIN;
  const minPi = cfg.minPerfusionIndexPct;
  const tally = new Tally(cols.from, cols.low, cols.high);

  let cursor = from; // everything before `cursor` has been counted
  let prevAt = -Infinity;
  let trustedReadings = 0;
  let untrustedReadings = 0;
  const n = readings.length;
  for (let i = 0; i < n; i++) {
    const r = readings[i]!;
    const at = r.at;
    checkTime(at, prevAt, i);
    prevAt = at;
    if (at >= to) break;
    const trusted = trustedWith(r, minPi, i);
    let end = at + maxGapMsFor(r.source, chartedMs, deviceMs, importMs, i);
    if (i + 1 < n) {
      const next = readings[i + 1]!.at;
      if (next < end) end = next; // a bad next time is caught on the next iteration
    }
    if (end > to) end = to;
    if (at >= from) {
      if (trusted) trustedReadings++;
      else untrustedReadings++;
      if (at > cursor) {
        tally.add(cursor, at, 0, 0);
        cursor = at;
      }
    }
    if (end > cursor) {
      tally.add(cursor, end, trusted ? 2 : 1, trusted ? (r.spo2 as number) : 0);
      cursor = end;
    }
  }
  if (cursor < to) tally.add(cursor, to, 0, 0);

  const scored = tally.inMs + tally.belowMs + tally.aboveMs;
  return {
    inBandMin: tally.inMs / MS_PER_MIN,
    belowMin: tally.belowMs / MS_PER_MIN,
    aboveMin: tally.aboveMs / MS_PER_MIN,
    untrustedMin: tally.untrustedMs / MS_PER_MIN,
    noReadingMin: tally.noReadingMs / MS_PER_MIN,
    noBandMin: tally.noBandMs / MS_PER_MIN,
    burdenPctMin: tally.burden / MS_PER_MIN,
    windowMin: (to - from) / MS_PER_MIN,
    timeInBandPct: scored > 0 ? (tally.inMs / scored) * 100 : null,
    trustedReadings,
    untrustedReadings,
  };
}
