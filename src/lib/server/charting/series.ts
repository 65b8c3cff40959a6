/** The bed chart's data: downsampled lines, band steps and the derived figures for one window. */
import { firstIndexAtOrAfter } from '~/lib/sorted.ts';
import type { DerivedFigures, Fio2Step, SeriesResponse, Spo2Point, SeriesPoint } from '~/lib/charting/api-types.ts';
import {
  bandCompliance,
  DEFAULT_COMPLIANCE_SETTINGS,
  imputedPf,
  keepBelowBandRunEdges,
  isTrusted,
  lttb,
  news2,
  roxIndex,
  sfRatio,
  type BandComplianceResult,
  type OxygenDevice,
  type Reading,
} from '~/lib/oxygenation/index.ts';
import {
  addCompliance,
  complianceFromMinutes,
  envelopeLines,
  floorMinute,
  minuteRollup,
  MINUTE_MS,
  type EnvelopePoint,
  type MinuteRollup,
} from '~/lib/oxygenation/rollup.ts';
import {
  chartedReadingsBetween,
  currentReadingsBetween,
  lastChartedObservation,
  latestSpo2Readings,
  type ObservationListRow,
  type ReadingRow,
} from '~/lib/server/queries/observations.ts';
import { minutesBetween, readingsWithCarryIn } from '~/lib/server/queries/rollup.ts';
import { ordersOf } from '~/lib/server/queries/orders.ts';
import { escalationsInWindow } from '~/lib/server/queries/escalations.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { authorisePatient } from './patients.ts';
import { gasMarks } from '~/lib/server/bloodgas/blood-gases.ts';
import { toBandOrders, toChartedObs, toReading } from './readings.ts';
import { news2InputOf } from '~/lib/charting/charted-obs.ts';

/** Points per line after downsampling: enough for a wide screen, small enough to draw fast. */
export const MAX_POINTS_PER_LINE = 1500;
/** Windows longer than this are served from the per-minute rollup; shorter ones from raw readings. */
export const RAW_WINDOW_MAX_HOURS = 6;

const round = (v: number, dp = 0) => Math.round(v * 10 ** dp) / 10 ** dp;

export async function patientSeries(
  user: SessionUser,
  patientId: number,
  hours: number,
  now = new Date(),
): Promise<SeriesResponse> {
  await authorisePatient(user, patientId, 'read');
  const to = now.getTime();
  const from = to - hours * 3_600_000;
  // Start early by the longest carry-forward so the window's first minutes are counted correctly.
  const lookBackMs = DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin * 60_000;
  const [orderRows, escalationRows, newestCharted, bloodGases] = await Promise.all([
    ordersOf(patientId),
    escalationsInWindow(patientId, new Date(from)),
    lastChartedObservation(patientId),
    gasMarks(patientId, new Date(from), new Date(to)),
  ]);
  const orders = toBandOrders(orderRows);
  // NEWS2 and ROX need a full charted set: the newest charted obs, when it falls in the window.
  const chartedInWindow =
    newestCharted && new Date(newestCharted.taken_at).getTime() >= from ? newestCharted : undefined;

  let lines: Pick<SeriesResponse, 'spo2' | 'heartRate' | 'rawCounts' | 'bucketMs'>;
  let compliance: BandComplianceResult;
  let latest: Reading | undefined;
  let newest: Reading | undefined;
  let chartedRows: ReadingRow[];
  if (hours <= RAW_WINDOW_MAX_HOURS) {
    const rows = await currentReadingsBetween(patientId, new Date(from - lookBackMs), new Date(to + 1));
    const readings = rows.map(toReading);
    const windowReadings = readings.slice(firstIndexAtOrAfter(readings, from, (r) => r.at));
    chartedRows = rows.filter((r) => r.source === 'charted');
    compliance = bandCompliance(readings, orders, { from, to });
    latest = latestTrusted(readings);
    newest = newestWithSpo2(readings);
    lines = rawLines(readings, windowReadings, orders, from, to);
  } else {
    // Long windows: whole minutes from the rollup; the part-minutes at either end from raw rows.
    const headEnd = Math.min(floorMinute(from) + (from % MINUTE_MS === 0 ? 0 : MINUTE_MS), to);
    const tailStart = Math.max(floorMinute(to), headEnd);
    const [minutes, head, tail, charted, latestRows] = await Promise.all([
      minutesBetween(patientId, new Date(floorMinute(from)), new Date(to + 1)),
      readingsWithCarryIn(patientId, from, headEnd),
      readingsWithCarryIn(patientId, tailStart, to + 1),
      chartedReadingsBetween(patientId, new Date(from - lookBackMs), new Date(to + 1)),
      latestSpo2Readings(patientId, new Date(to + 1), 200),
    ]);
    chartedRows = charted;
    compliance = addCompliance(
      addCompliance(
        bandCompliance(head.map(toReading), orders, { from, to: headEnd }),
        complianceFromMinutes(minutes, orders, { from: headEnd, to: tailStart }),
      ),
      bandCompliance(tail.map(toReading), orders, { from: tailStart, to }),
    );
    const latestReadings = latestRows.map(toReading).reverse();
    latest = latestTrusted(latestReadings);
    newest = newestWithSpo2(latestReadings);
    lines = minuteLines(
      minutes,
      charted.map(toReading).filter((r) => r.at >= from),
      from,
      to,
    );
    // Readings counted once: the head's raw rows, then whole minutes from the rollup.
    const headIn = head.filter((r) => new Date(r.taken_at).getTime() >= from);
    lines.rawCounts = {
      spo2: headIn.filter((r) => r.spo2 !== null).length + lines.rawCounts.spo2,
      heartRate: headIn.filter((r) => r.heart_rate !== null).length + lines.rawCounts.heartRate,
    };
  }

  return {
    patientId,
    hours,
    from,
    to,
    generatedAt: now.toISOString(),
    ...lines,
    fio2: fio2Steps(chartedRows, from),
    bands: bandSegments(orders, from, to),
    escalations: escalationRows.map((e) => ({
      id: e.id,
      raisedAt: new Date(e.raised_at).getTime(),
      closedAt: e.closed_at ? new Date(e.closed_at).getTime() : null,
      kind: e.kind,
      severity: e.severity,
    })),
    bloodGases,
    newestReading:
      newest && newest.at >= from
        ? { t: newest.at, v: newest.spo2!, trusted: isTrusted(newest), source: newest.source }
        : null,
    derived: derivedFigures(compliance, latest, chartedRows, chartedInWindow, orderRows, from, to, hours),
  };
}

function newestWithSpo2(readings: Reading[]): Reading | undefined {
  for (let i = readings.length - 1; i >= 0; i--) if (readings[i]!.spo2 !== null) return readings[i];
  return undefined;
}

function latestTrusted(readings: Reading[]): Reading | undefined {
  for (let i = readings.length - 1; i >= 0; i--)
    if (readings[i]!.spo2 !== null && isTrusted(readings[i]!)) return readings[i];
  return undefined;
}

/**
 * Short windows: raw readings, largest-triangle-three-buckets with the below-band run edges kept —
 * unless the signal hovers at the limit and the edges alone would fill the line; then one min–max
 * envelope point a minute, like long windows, so no line passes the budget whatever its shape.
 */
function rawLines(
  readings: Reading[],
  windowReadings: Reading[],
  orders: ReturnType<typeof toBandOrders>,
  from: number,
  to: number,
) {
  const withSpo2 = windowReadings.filter((r) => r.spo2 !== null);
  const withHr = windowReadings.filter((r) => r.heartRate !== null && r.heartRate !== undefined);
  const rawCounts = { spo2: withSpo2.length, heartRate: withHr.length };
  const keep = keepBelowBandRunEdges(withSpo2, orders);
  let edges = 0;
  for (let i = 1; i < withSpo2.length - 1 && edges <= MAX_POINTS_PER_LINE / 2; i++) if (keep(withSpo2[i]!, i)) edges++;
  if (edges > MAX_POINTS_PER_LINE / 2) {
    const minutes = minuteRollup(readings, floorMinute(from), to);
    return {
      ...minuteLines(
        minutes,
        windowReadings.filter((r) => r.source === 'charted'),
        from,
        to,
      ),
      rawCounts,
    };
  }
  const spo2: Spo2Point[] = lttb(
    withSpo2,
    MAX_POINTS_PER_LINE,
    (r) => r.at,
    (r) => r.spo2!,
    keep,
  ).map((r) => ({
    t: r.at,
    v: r.spo2!,
    trusted: isTrusted(r),
    source: r.source,
  }));
  const heartRate = lttb(
    withHr,
    MAX_POINTS_PER_LINE,
    (r) => r.at,
    (r) => r.heartRate!,
  ).map((r) => ({ t: r.at, v: r.heartRate! }));
  return { spo2, heartRate, rawCounts, bucketMs: 0 };
}

/** Enveloped lines from minute rows, with each charted obs as its own point (drawn as charted). */
function minuteLines(
  minutes: MinuteRollup[],
  charted: Reading[],
  from: number,
  to: number,
  countFrom = Math.ceil(from / MINUTE_MS) * MINUTE_MS,
) {
  const chartedSpo2 = charted.filter((r) => r.spo2 !== null).slice(-200);
  // Half the line budget is plenty when each point carries its min–max envelope, and keeps the answer small.
  const env = envelopeLines(minutes, from, to, Math.floor(MAX_POINTS_PER_LINE / 2) - chartedSpo2.length);
  const toPoint = (p: EnvelopePoint): Spo2Point => ({
    t: p.t,
    v: p.v,
    lo: p.lo,
    hi: p.hi,
    trusted: p.trusted,
    source: p.charted ? 'charted' : 'device',
  });
  const spo2 = [
    ...env.spo2.filter((p) => !p.charted).map(toPoint),
    ...chartedSpo2.map((r) => ({ t: r.at, v: r.spo2!, trusted: isTrusted(r), source: r.source })),
  ].sort((a, b) => a.t - b.t);
  const heartRate: SeriesPoint[] = env.heartRate.map((p) => ({ t: p.t, v: p.v, lo: p.lo, hi: p.hi }));
  let spo2N = 0;
  let hrN = 0;
  for (const m of minutes) {
    if (m.minute < countFrom || m.minute >= to) continue;
    spo2N += m.spo2N + m.uSpo2N;
    hrN += m.hrN;
  }
  return { spo2, heartRate, rawCounts: { spo2: spo2N, heartRate: hrN }, bucketMs: env.bucketMs };
}

/** FiO₂ as a step line from charted obs: the value in force at the window start, then each change of value, device or flow. */
function fio2Steps(rows: ReadingRow[], from: number): Fio2Step[] {
  const steps: Fio2Step[] = [];
  for (const r of rows) {
    if (r.fio2 === null || r.fio2 === undefined) continue;
    const v = Number(r.fio2);
    const device = (r.device as OxygenDevice | null) ?? null;
    const flowLpm = r.flow_lpm === null ? null : Number(r.flow_lpm);
    const t = Math.max(new Date(r.taken_at).getTime(), from);
    const last = steps[steps.length - 1];
    if (last && last.v === v && last.device === device && last.flowLpm === flowLpm) continue;
    const step = { t, v, device, flowLpm, estimated: Boolean(r.fio2_estimated) };
    if (last && last.t === t) steps[steps.length - 1] = step;
    else steps.push(step);
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

function derivedFigures(
  c: BandComplianceResult,
  latest: Reading | undefined,
  chartedRows: ReadingRow[],
  lastCharted: ObservationListRow | undefined,
  orderRows: Awaited<ReturnType<typeof ordersOf>>,
  from: number,
  to: number,
  hours: number,
): DerivedFigures {
  const currentOrder = orderRows[0];
  const scale = (currentOrder ? Number(currentOrder.news2_scale) : 1) as 1 | 2;

  // S/F and imputed P/F: the latest trusted SpO₂ with the latest charted FiO₂.
  let fio2Reading: Reading | undefined;
  for (let i = chartedRows.length - 1; i >= 0; i--) {
    if (chartedRows[i]!.fio2 !== null) {
      fio2Reading = toReading(chartedRows[i]!);
      break;
    }
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
    news = {
      total: result.total,
      complete: result.complete,
      missing: result.missing,
      response: result.response,
      scale,
      takenAt: new Date(lastCharted.taken_at).toISOString(),
    };
  }

  return {
    window: { from: new Date(from).toISOString(), to: new Date(to).toISOString(), hours },
    compliance: {
      inBandMin: round(c.inBandMin, 1),
      belowMin: round(c.belowMin, 1),
      aboveMin: round(c.aboveMin, 1),
      untrustedMin: round(c.untrustedMin, 1),
      noReadingMin: round(c.noReadingMin, 1),
      noBandMin: round(c.noBandMin, 1),
      windowMin: round(c.windowMin, 1),
      burdenPctMin: round(c.burdenPctMin, 1),
      inBandPct: c.timeInBandPct === null ? null : round(c.timeInBandPct, 1),
      trustedReadings: c.trustedReadings,
      untrustedReadings: c.untrustedReadings,
    },
    latest: {
      takenAt: latest ? new Date(latest.at).toISOString() : null,
      spo2: latest?.spo2 ?? null,
      fio2,
      fio2Estimated: Boolean(fio2Reading?.fio2Estimated),
      device: fio2Reading?.device ?? latest?.device ?? null,
      sf,
      rox,
      roxNote,
      imputedPf: pf,
      imputedPfNote: pfNote,
      news2: news,
    },
  };
}
