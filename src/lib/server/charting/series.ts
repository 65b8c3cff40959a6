/** The bed chart's data: downsampled lines, band steps and the derived figures for one window. */
import type { DerivedFigures, SeriesResponse, Spo2Point } from '~/lib/charting/api-types.ts';
import {
  bandCompliance, DEFAULT_COMPLIANCE_SETTINGS, imputedPf, keepBelowBandRunEdges, isTrusted, lttb, news2, roxIndex, sfRatio, type Reading,
} from '~/lib/oxygenation/index.ts';
import { currentReadingsBetween, lastChartedObservation, type ObservationListRow } from '~/lib/server/queries/observations.ts';
import { ordersOf } from '~/lib/server/queries/orders.ts';
import { escalationsInWindow } from '~/lib/server/queries/escalations.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { authorisePatient } from './patients.ts';
import { gasMarks } from '~/lib/server/bloodgas/blood-gases.ts';
import { toBandOrders, toChartedObs, toReading } from './readings.ts';
import { news2InputOf } from '~/lib/charting/charted-obs.ts';

export const SERIES_WINDOWS = [6, 12, 24, 72] as const;
/** Points per line after downsampling: enough for a wide screen, small enough to draw fast. */
export const MAX_POINTS_PER_LINE = 1500;

const round = (v: number, dp = 0) => Math.round(v * 10 ** dp) / 10 ** dp;

export async function patientSeries(user: SessionUser, patientId: number, hours: number, now = new Date()): Promise<SeriesResponse> {
  await authorisePatient(user, patientId, 'read');
  const to = now.getTime();
  const from = to - hours * 3_600_000;
  // Start early by the longest carry-forward so the window's first minutes are counted correctly.
  const lookBackMs = DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin * 60_000;
  const [rows, orderRows, escalationRows, newestCharted, bloodGases] = await Promise.all([
    currentReadingsBetween(patientId, new Date(from - lookBackMs), new Date(to + 1)),
    ordersOf(patientId),
    escalationsInWindow(patientId, new Date(from)),
    lastChartedObservation(patientId),
    gasMarks(patientId, new Date(from), new Date(to)),
  ]);
  const readings = rows.map(toReading);
  const orders = toBandOrders(orderRows);
  const inWindow = firstIndexAtOrAfter(readings, from);
  const windowReadings = readings.slice(inWindow);
  // NEWS2 and ROX need a full charted set: the newest charted obs, when it falls in the window.
  const chartedInWindow = newestCharted && new Date(newestCharted.taken_at).getTime() >= from ? newestCharted : undefined;

  const withSpo2 = windowReadings.filter((r) => r.spo2 !== null);
  const keep = keepBelowBandRunEdges(withSpo2, orders);
  const spo2: Spo2Point[] = lttb(withSpo2, MAX_POINTS_PER_LINE, (r) => r.at, (r) => r.spo2!, keep).map((r) => ({
    t: r.at, v: r.spo2!, trusted: isTrusted(r), source: r.source,
  }));
  const withHr = windowReadings.filter((r) => r.heartRate !== null && r.heartRate !== undefined);
  const heartRate = lttb(withHr, MAX_POINTS_PER_LINE, (r) => r.at, (r) => r.heartRate!).map((r) => ({ t: r.at, v: r.heartRate! }));

  return {
    patientId, hours, from, to, generatedAt: now.toISOString(), spo2, heartRate,
    fio2: fio2Steps(readings, from),
    bands: bandSegments(orders, from, to),
    escalations: escalationRows.map((e) => ({
      id: e.id, raisedAt: new Date(e.raised_at).getTime(), closedAt: e.closed_at ? new Date(e.closed_at).getTime() : null, kind: e.kind, severity: e.severity,
    })),
    rawCounts: { spo2: withSpo2.length, heartRate: withHr.length },
    bloodGases,
    derived: derivedFigures(readings, chartedInWindow, orderRows, from, to, hours),
  };
}

function firstIndexAtOrAfter(readings: Reading[], t: number): number {
  let lo = 0;
  let hi = readings.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (readings[mid]!.at < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** FiO₂ as a step line: the value in force at the window start, then each change. */
function fio2Steps(readings: Reading[], from: number) {
  const steps: { t: number; v: number }[] = [];
  for (const r of readings) {
    if (r.fio2 === null || r.fio2 === undefined) continue;
    const t = Math.max(r.at, from);
    const last = steps[steps.length - 1];
    if (last && last.v === r.fio2) continue;
    if (last && last.t === t) last.v = r.fio2;
    else steps.push({ t, v: r.fio2 });
  }
  return steps;
}

function bandSegments(orders: { from: number; low: number; high: number }[], from: number, to: number) {
  const segments = [];
  for (let i = 0; i < orders.length; i++) {
    const start = Math.max(orders[i]!.from, from);
    const end = Math.min(i + 1 < orders.length ? orders[i + 1]!.from : to, to);
    if (end > start) segments.push({ from: start, to: end, low: orders[i]!.low, high: orders[i]!.high });
  }
  return segments;
}

function derivedFigures(readings: Reading[], lastCharted: ObservationListRow | undefined, orderRows: Awaited<ReturnType<typeof ordersOf>>, from: number, to: number, hours: number): DerivedFigures {
  const c = bandCompliance(readings, toBandOrders(orderRows), { from, to });
  const currentOrder = orderRows[0];
  const scale = (currentOrder ? Number(currentOrder.news2_scale) : 1) as 1 | 2;

  // Latest trusted reading with SpO₂ for S/F and imputed P/F; FiO₂ carried from the latest charted value.
  let latest: Reading | undefined;
  for (let i = readings.length - 1; i >= 0; i--) {
    if (readings[i]!.spo2 !== null && isTrusted(readings[i]!)) { latest = readings[i]; break; }
  }
  let fio2Reading: Reading | undefined;
  for (let i = readings.length - 1; i >= 0; i--) {
    if (readings[i]!.fio2 !== null && readings[i]!.fio2 !== undefined) { fio2Reading = readings[i]; break; }
  }
  const fio2 = fio2Reading?.fio2 ?? null;
  const sf = latest && fio2 ? round(sfRatio(latest.spo2!, fio2)) : null;

  let pf: DerivedFigures['latest']['imputedPf'] = null;
  let pfNote: string | null = null;
  if (latest && fio2) {
    const r = imputedPf(latest.spo2!, fio2);
    if ('refused' in r) pfNote = r.refused;
    else pf = { pao2: round(r.pao2, 1), pf: round(r.pf) };
  } else pfNote = 'Needs a trusted SpO₂ and a known FiO₂';

  let rox: number | null = null;
  let roxNote: string | null = null;
  let news: DerivedFigures['latest']['news2'] = null;
  if (lastCharted) {
    const spo2 = lastCharted.spo2 === null ? null : Number(lastCharted.spo2);
    const chartedFio2 = lastCharted.fio2 === null ? null : Number(lastCharted.fio2);
    if (lastCharted.device === 'high_flow_nasal') {
      if (spo2 !== null && chartedFio2 && lastCharted.resp_rate) {
        const r = roxIndex(spo2, chartedFio2, lastCharted.resp_rate, 'high_flow_nasal');
        if ('refused' in r) roxNote = r.refused;
        else rox = round(r.rox, 2);
      } else roxNote = 'Needs SpO₂, FiO₂ and respiratory rate charted together';
    }
    const result = news2(news2InputOf(toChartedObs(lastCharted)), scale);
    news = { total: result.total, complete: result.complete, missing: result.missing, response: result.response, scale, takenAt: new Date(lastCharted.taken_at).toISOString() };
  }

  return {
    window: { from: new Date(from).toISOString(), to: new Date(to).toISOString(), hours },
    compliance: {
      inBandMin: round(c.inBandMin, 1), belowMin: round(c.belowMin, 1), aboveMin: round(c.aboveMin, 1), untrustedMin: round(c.untrustedMin, 1),
      noReadingMin: round(c.noReadingMin, 1), noBandMin: round(c.noBandMin, 1), windowMin: round(c.windowMin, 1), burdenPctMin: round(c.burdenPctMin, 1),
      inBandPct: c.timeInBandPct === null ? null : round(c.timeInBandPct, 1), trustedReadings: c.trustedReadings, untrustedReadings: c.untrustedReadings,
    },
    latest: {
      takenAt: latest ? new Date(latest.at).toISOString() : null, spo2: latest?.spo2 ?? null, fio2, fio2Estimated: Boolean(fio2Reading?.fio2Estimated),
      device: fio2Reading?.device ?? latest?.device ?? null, sf, rox, roxNote, imputedPf: pf, imputedPfNote: pfNote, news2: news,
    },
  };
}
