/**
 * A unit's figures per local day: every band figure comes from `bandCompliance` (the same call the
 * bed chart makes), per patient and day, clipped to the patient's stays in the unit; this module only
 * adds them up. Response times and overdue obs are counted here from event times.
 */
import { firstIndexAtOrAfter } from '~/lib/sorted.ts';
import { bandCompliance, DEFAULT_COMPLIANCE_SETTINGS, type BandOrder, type Reading } from '~/lib/oxygenation/index.ts';
import type { LocalDay } from './shift.ts';
import { spread, type Spread } from './stats.ts';

const atOf = (r: { at: number }) => r.at;

export interface ReportPatientInput {
  patientId: number;
  /** Stays in this unit, epoch ms; `to` null while still in the unit. */
  stays: { from: number; to: number | null }[];
  /** Current readings, oldest first, from at least the carry-forward limit before the first day. */
  readings: Reading[];
  orders: BandOrder[];
}

export type EscalationKind = 'below_band' | 'probe_check' | 'wean_prompt';
export interface ReportEscalationInput {
  kind: EscalationKind;
  severity: 'standard' | 'urgent' | null;
  raisedAt: number;
  claimedAt: number | null;
  closedAt: number | null;
}

export interface EscalationCounts {
  belowStandard: number;
  belowUrgent: number;
  probeCheck: number;
  weanPrompt: number;
}

export interface ReportFigures {
  /** Patient-days: minutes patients were in the unit / 1440. */
  patientDays: number;
  inBandMin: number;
  belowMin: number;
  aboveMin: number;
  untrustedMin: number;
  noReadingMin: number;
  burdenPctMin: number;
  /** inBand / (inBand + below + above) × 100; null without trusted time under a band. */
  timeInBandPct: number | null;
  /** belowMin / patientDays; null with no patient-days. */
  belowMinPerPatientDay: number | null;
  escalations: EscalationCounts;
  /** Minutes raised → claimed, and claimed → closed, of escalations raised that day. */
  toClaimMin: Spread;
  toCloseMin: Spread;
  /** Times a patient's charted obs went past the overdue limit (counted on the day it happened). */
  overdueCount: number;
  trustedReadings: number;
  untrustedReadings: number;
  /** untrusted / (trusted + untrusted) × 100; null without readings. */
  untrustedSharePct: number | null;
}

export interface ReportDayFigures extends ReportFigures {
  date: string;
  from: number;
  to: number;
}

export interface PatientDayFigures {
  patientId: number;
  date: string;
  from: number;
  to: number;
  stayMin: number;
  inBandMin: number;
  belowMin: number;
  aboveMin: number;
  untrustedMin: number;
  noReadingMin: number;
  burdenPctMin: number;
  timeInBandPct: number | null;
  trustedReadings: number;
  untrustedReadings: number;
}

const MIN = 60_000;

/** Each patient's windows in a day: the day clipped to each stay. */
function windowsIn(
  day: { from: number; to: number },
  stays: ReportPatientInput['stays'],
): { from: number; to: number }[] {
  const out = [];
  for (const s of stays) {
    const from = Math.max(day.from, s.from);
    const to = Math.min(day.to, s.to ?? Infinity);
    if (to > from) out.push({ from, to });
  }
  return out;
}

// No reading carries forward further than the longest gap setting, so earlier readings cannot change a window.
const LOOKBACK_MS =
  Math.max(
    DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin,
    DEFAULT_COMPLIANCE_SETTINGS.deviceMaxGapMin,
    DEFAULT_COMPLIANCE_SETTINGS.importMaxGapMin,
  ) * 60_000;

/**
 * Band figures of one patient on one day, straight from bandCompliance over each stay window (the
 * readings handed to it are cut to the window and its carry-forward look-back, which gives the
 * same result as the whole list: nothing older can reach into the window).
 */
export function patientDay(
  p: ReportPatientInput,
  day: { date: string; from: number; to: number },
): PatientDayFigures | null {
  const windows = windowsIn(day, p.stays);
  if (windows.length === 0) return null;
  const f = {
    stayMin: 0,
    inBandMin: 0,
    belowMin: 0,
    aboveMin: 0,
    untrustedMin: 0,
    noReadingMin: 0,
    burdenPctMin: 0,
    trustedReadings: 0,
    untrustedReadings: 0,
  };
  for (const w of windows) {
    const slice = p.readings.slice(
      firstIndexAtOrAfter(p.readings, w.from - LOOKBACK_MS, atOf),
      firstIndexAtOrAfter(p.readings, w.to, atOf),
    );
    const c = bandCompliance(slice, p.orders, w);
    f.stayMin += (w.to - w.from) / MIN;
    f.inBandMin += c.inBandMin;
    f.belowMin += c.belowMin;
    f.aboveMin += c.aboveMin;
    f.untrustedMin += c.untrustedMin;
    f.noReadingMin += c.noReadingMin;
    f.burdenPctMin += c.burdenPctMin;
    f.trustedReadings += c.trustedReadings;
    f.untrustedReadings += c.untrustedReadings;
  }
  const scored = f.inBandMin + f.belowMin + f.aboveMin;
  return {
    patientId: p.patientId,
    date: day.date,
    from: windows[0]!.from,
    to: windows[windows.length - 1]!.to,
    ...f,
    timeInBandPct: scored > 0 ? (f.inBandMin / scored) * 100 : null,
  };
}

/**
 * Start times of overdue episodes: after each charted obs (or the stay start) the next is due within
 * `overdueMin`; when it came later, or never came while the patient stayed, an episode began at the due time.
 */
export function overdueStarts(
  chartedTimes: readonly number[],
  stays: ReportPatientInput['stays'],
  overdueMin: number,
  until: number,
): number[] {
  const starts: number[] = [];
  for (const s of stays) {
    const end = Math.min(s.to ?? Infinity, until);
    let last = s.from;
    for (const t of chartedTimes) {
      if (t < s.from || t >= end) continue;
      if (t - last > overdueMin * MIN) starts.push(last + overdueMin * MIN);
      last = t;
    }
    if (end - last > overdueMin * MIN) starts.push(last + overdueMin * MIN);
  }
  return starts;
}

function emptyFigures(): ReportFigures {
  return {
    patientDays: 0,
    inBandMin: 0,
    belowMin: 0,
    aboveMin: 0,
    untrustedMin: 0,
    noReadingMin: 0,
    burdenPctMin: 0,
    timeInBandPct: null,
    belowMinPerPatientDay: null,
    escalations: { belowStandard: 0, belowUrgent: 0, probeCheck: 0, weanPrompt: 0 },
    toClaimMin: spread([]),
    toCloseMin: spread([]),
    overdueCount: 0,
    trustedReadings: 0,
    untrustedReadings: 0,
    untrustedSharePct: null,
  };
}

interface Acc {
  f: ReportFigures;
  stayMin: number;
  toClaim: number[];
  toClose: number[];
}

function finish(a: Acc): ReportFigures {
  const f = a.f;
  const scored = f.inBandMin + f.belowMin + f.aboveMin;
  f.patientDays = a.stayMin / 1440;
  f.timeInBandPct = scored > 0 ? (f.inBandMin / scored) * 100 : null;
  f.belowMinPerPatientDay = f.patientDays > 0 ? f.belowMin / f.patientDays : null;
  f.toClaimMin = spread(a.toClaim);
  f.toCloseMin = spread(a.toClose);
  const readings = f.trustedReadings + f.untrustedReadings;
  f.untrustedSharePct = readings > 0 ? (f.untrustedReadings / readings) * 100 : null;
  return f;
}

function countEscalation(a: Acc, e: ReportEscalationInput) {
  const c = a.f.escalations;
  if (e.kind === 'below_band') {
    if (e.severity === 'urgent') c.belowUrgent++;
    else c.belowStandard++;
  } else if (e.kind === 'probe_check') c.probeCheck++;
  else c.weanPrompt++;
  if (e.claimedAt !== null) a.toClaim.push((e.claimedAt - e.raisedAt) / MIN);
  if (e.claimedAt !== null && e.closedAt !== null) a.toClose.push((e.closedAt - e.claimedAt) / MIN);
}

export interface UnitReportInput {
  days: LocalDay[];
  patients: (ReportPatientInput & { chartedTimes: number[] })[];
  escalations: ReportEscalationInput[];
  overdueMin: number;
}

export interface UnitReportFigures {
  days: ReportDayFigures[];
  total: ReportFigures;
  patientDays: PatientDayFigures[];
}

/** Per-day figures and the total over the whole period. */
export function unitReportFigures(input: UnitReportInput): UnitReportFigures {
  const accs: Acc[] = input.days.map(() => ({ f: emptyFigures(), stayMin: 0, toClaim: [], toClose: [] }));
  const total: Acc = { f: emptyFigures(), stayMin: 0, toClaim: [], toClose: [] };
  const dayIndex = (t: number) => input.days.findIndex((d) => t >= d.from && t < d.to);
  const periodEnd = input.days.length ? input.days[input.days.length - 1]!.to : 0;
  const patientDays: PatientDayFigures[] = [];

  for (const p of input.patients) {
    input.days.forEach((day, i) => {
      const pd = patientDay(p, day);
      if (!pd) return;
      patientDays.push(pd);
      for (const a of [accs[i]!, total]) {
        a.stayMin += pd.stayMin;
        a.f.inBandMin += pd.inBandMin;
        a.f.belowMin += pd.belowMin;
        a.f.aboveMin += pd.aboveMin;
        a.f.untrustedMin += pd.untrustedMin;
        a.f.noReadingMin += pd.noReadingMin;
        a.f.burdenPctMin += pd.burdenPctMin;
        a.f.trustedReadings += pd.trustedReadings;
        a.f.untrustedReadings += pd.untrustedReadings;
      }
    });
    for (const t of overdueStarts(p.chartedTimes, p.stays, input.overdueMin, periodEnd)) {
      const i = dayIndex(t);
      if (i < 0) continue;
      accs[i]!.f.overdueCount++;
      total.f.overdueCount++;
    }
  }
  for (const e of input.escalations) {
    const i = dayIndex(e.raisedAt);
    if (i < 0) continue;
    countEscalation(accs[i]!, e);
    countEscalation(total, e);
  }
  return {
    days: input.days.map((d, i) => ({ date: d.date, from: d.from, to: d.to, ...finish(accs[i]!) })),
    total: finish(total),
    patientDays,
  };
}
