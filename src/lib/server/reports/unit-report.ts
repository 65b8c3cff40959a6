/**
 * The unit report: per local day over 7, 30 or 90 whole days, each patient-day's band figures from
 * `bandCompliance` over that patient's raw current readings (the bed chart's own computation), added
 * up by `unitReportFigures`. Readings are read one patient at a time, a few at once, to bound memory.
 */
import { HOSPITAL_REPORT_ROLES, REPORT_ROLES, hasRole } from '~/lib/auth/roles.ts';
import { DEFAULT_COMPLIANCE_SETTINGS, type BandOrder, type Reading } from '~/lib/oxygenation/index.ts';
import type {
  HospitalReportResponse,
  ReportDays,
  ReportFiguresView,
  UnitReportResponse,
} from '~/lib/reports/api-types.ts';
import { lastWholeDays } from '~/lib/reports/shift.ts';
import { unitReportFigures, type ReportFigures, type UnitReportFigures } from '~/lib/reports/unit-report.ts';
import { settingsFromRow } from '~/lib/units/settings.ts';
import { ApiError } from '~/lib/server/http.ts';
import {
  chartedTimesBetween,
  complianceReadingsBetween,
  ordersOfPatients,
  unitEscalationsRaisedBetween,
  unitStaysBetween,
} from '~/lib/server/queries/reports.ts';
import { unitSettingsRow } from '~/lib/server/queries/unit-settings.ts';
import { listUnits, type UnitRow } from '~/lib/server/queries/units.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

const LOOKBACK_MS = DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin * 60_000;
/** Patients whose readings are read at once: bounds memory (a 90-day patient is ~130k rows) and pool use. */
const PARALLEL_PATIENTS = 3;

const ms = (d: Date | null) => (d === null ? null : new Date(d).getTime());
const r1 = (v: number) => Math.round(v * 10) / 10;
const r1n = (v: number | null) => (v === null ? null : r1(v));

/** Charge nurses report on their own unit; those who open the hospital-wide report (intensivists, administrators) on every unit. */
export async function reportUnits(user: SessionUser): Promise<UnitRow[]> {
  if (!hasRole(user.role, REPORT_ROLES))
    throw new ApiError(403, 'forbidden', 'Unit reports are for charge nurses, intensivists and administrators.');
  return hasRole(user.role, HOSPITAL_REPORT_ROLES) ? listUnits(null) : listUnits(user.unitId ?? -1);
}

async function resolveUnit(user: SessionUser, code: string | undefined): Promise<{ unit: UnitRow; units: UnitRow[] }> {
  const units = await reportUnits(user);
  const unit = code ? units.find((u) => u.code === code) : (units.find((u) => u.id === user.unitId) ?? units[0]);
  if (!unit) {
    if (!code) throw new ApiError(404, 'not_found', 'No unit to report on.');
    const exists = (await listUnits(null)).some((u) => u.code === code);
    throw exists
      ? new ApiError(403, 'forbidden', `Unit ${code} is not one you can report on.`)
      : new ApiError(404, 'not_found', `No unit ${code}.`);
  }
  return { unit, units };
}

async function inBatches<T, R>(items: T[], size: number, f: (item: T) => Promise<R>): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: Math.min(size, items.length) }, async () => {
      while (next < items.length) {
        const i = next++;
        out[i] = await f(items[i]!);
      }
    }),
  );
  return out;
}

/** Every figure of the report for one unit (the per-patient-day figures included, for checks). */
export async function computeUnitReport(
  unit: UnitRow,
  days: number,
  now: Date,
): Promise<{ figures: UnitReportFigures; period: { from: number; to: number }; overdueMin: number }> {
  const dayList = lastWholeDays(now.getTime(), unit.time_zone, days);
  const from = dayList[0]!.from;
  const to = dayList[dayList.length - 1]!.to;
  const settings = settingsFromRow(await unitSettingsRow(unit.id));
  const stays = await unitStaysBetween(unit.id, new Date(from), new Date(to));
  const patientIds = [...new Set(stays.map((s) => s.patient_id))];
  const [orderRows, charted, escalations] = await Promise.all([
    ordersOfPatients(patientIds),
    chartedTimesBetween(patientIds, new Date(from - settings.overdueMin * 60_000), new Date(to)),
    unitEscalationsRaisedBetween(unit.id, new Date(from), new Date(to)),
  ]);
  const ordersBy = new Map<number, BandOrder[]>();
  for (const o of orderRows) {
    if (!ordersBy.has(o.patient_id)) ordersBy.set(o.patient_id, []);
    ordersBy.get(o.patient_id)!.push({ from: new Date(o.ordered_at).getTime(), low: o.low, high: o.high });
  }
  const chartedBy = new Map<number, number[]>();
  for (const c of charted) {
    if (!chartedBy.has(c.patient_id)) chartedBy.set(c.patient_id, []);
    chartedBy.get(c.patient_id)!.push(new Date(c.taken_at).getTime());
  }

  const patients = await inBatches(patientIds, PARALLEL_PATIENTS, async (patientId) => {
    const rows = await complianceReadingsBetween(patientId, new Date(from - LOOKBACK_MS), new Date(to));
    const readings: Reading[] = rows.map(([at, source, spo2, trace, pi]) => ({
      at: Number(at),
      spo2: spo2 === null ? null : Number(spo2),
      trace,
      perfusionIndex: pi === null ? null : Number(pi),
      source,
    }));
    return {
      patientId,
      readings,
      stays: stays
        .filter((s) => s.patient_id === patientId)
        .map((s) => ({ from: ms(s.started_at)!, to: ms(s.ended_at) })),
      orders: (ordersBy.get(patientId) ?? []).sort((a, b) => a.from - b.from),
      chartedTimes: chartedBy.get(patientId) ?? [],
    };
  });

  const figures = unitReportFigures({
    days: dayList,
    patients,
    overdueMin: settings.overdueMin,
    escalations: escalations.map((e) => ({
      kind: e.kind,
      severity: e.severity,
      raisedAt: ms(e.raised_at)!,
      claimedAt: ms(e.claimed_at),
      closedAt: ms(e.closed_at),
    })),
  });
  return { figures, period: { from, to }, overdueMin: settings.overdueMin };
}

export function figuresView(f: ReportFigures): ReportFiguresView {
  const sp = (s: ReportFigures['toClaimMin']) => ({ n: s.n, median: r1n(s.median), p90: r1n(s.p90) });
  return {
    patientDays: Math.round(f.patientDays * 100) / 100,
    timeInBandPct: r1n(f.timeInBandPct),
    inBandMin: r1(f.inBandMin),
    belowMin: r1(f.belowMin),
    aboveMin: r1(f.aboveMin),
    untrustedMin: r1(f.untrustedMin),
    noReadingMin: r1(f.noReadingMin),
    burdenPctMin: r1(f.burdenPctMin),
    belowMinPerPatientDay: r1n(f.belowMinPerPatientDay),
    escalations: f.escalations,
    toClaimMin: sp(f.toClaimMin),
    toCloseMin: sp(f.toCloseMin),
    overdueCount: f.overdueCount,
    trustedReadings: f.trustedReadings,
    untrustedReadings: f.untrustedReadings,
    untrustedSharePct: r1n(f.untrustedSharePct),
  };
}

export async function unitReport(
  user: SessionUser,
  code: string | undefined,
  days: ReportDays,
  now = new Date(),
): Promise<UnitReportResponse> {
  const { unit, units } = await resolveUnit(user, code);
  const { figures, period, overdueMin } = await computeUnitReport(unit, days, now);
  return {
    unit: { code: unit.code, name: unit.name, timeZone: unit.time_zone },
    units: units.map((u) => ({ code: u.code, name: u.name })),
    days,
    period: { from: new Date(period.from).toISOString(), to: new Date(period.to).toISOString() },
    generatedAt: now.toISOString(),
    settings: { overdueMin },
    perDay: figures.days.map((d) => ({
      date: d.date,
      from: new Date(d.from).toISOString(),
      to: new Date(d.to).toISOString(),
      ...figuresView(d),
    })),
    total: figuresView(figures.total),
    hospitalView: hasRole(user.role, HOSPITAL_REPORT_ROLES),
  };
}

/** Every unit's totals side by side (intensivists and administrators). */
export async function hospitalReport(
  user: SessionUser,
  days: ReportDays,
  now = new Date(),
): Promise<HospitalReportResponse> {
  if (!hasRole(user.role, HOSPITAL_REPORT_ROLES))
    throw new ApiError(403, 'forbidden', 'The hospital-wide report is for intensivists and administrators.');
  const units = await listUnits(null);
  const rows = [];
  for (const unit of units) {
    const { figures, period } = await computeUnitReport(unit, days, now);
    rows.push({
      unit: { code: unit.code, name: unit.name, timeZone: unit.time_zone },
      period: { from: new Date(period.from).toISOString(), to: new Date(period.to).toISOString() },
      total: figuresView(figures.total),
    });
  }
  return { days, generatedAt: now.toISOString(), units: rows };
}
