/**
 * The per-minute rollup of readings (`observation_minutes`): recomputed from the raw rows for the
 * minutes a write touched, inside the writer's transaction, so the rollup never disagrees with
 * the record. Every path that stores, corrects, marks or withdraws readings calls
 * `refreshMinuteRollup` (the device feed does it in its shared path, so any gateway gets it).
 */
import { DEFAULT_COMPLIANCE_SETTINGS } from '~/lib/oxygenation/settings.ts';
import {
  decodeTrustedMs,
  encodeTrustedMs,
  floorMinute,
  minuteRollup,
  MINUTE_MS,
  type MinuteRollup,
} from '~/lib/oxygenation/rollup.ts';
import { toReading } from '~/lib/server/charting/readings.ts';
import { db } from './db.ts';
import type { ReadingRow } from './observations.ts';
import type { Conn } from './patients.ts';

const READING_COLUMNS = [
  'taken_at',
  'source',
  'spo2',
  'heart_rate',
  'resp_rate',
  'fio2',
  'fio2_estimated',
  'device',
  'flow_lpm',
  'trace',
  'perfusion_index',
];
/** The longest any reading carries forward (charted obs), past which a change cannot reach. */
const MAX_CARRY_MS =
  Math.max(
    DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin,
    DEFAULT_COMPLIANCE_SETTINGS.deviceMaxGapMin,
    DEFAULT_COMPLIANCE_SETTINGS.importMaxGapMin,
  ) * MINUTE_MS;

const current = (conn: Conn, patientId: number) =>
  conn('observations').where({ patient_id: patientId, status: 'current' });

async function lastBefore(conn: Conn, patientId: number, t: number): Promise<ReadingRow | undefined> {
  return current(conn, patientId)
    .andWhere('taken_at', '<', new Date(t))
    .orderBy('taken_at', 'desc')
    .orderBy('id', 'desc')
    .first(READING_COLUMNS);
}

/**
 * Recomputes the minutes of one patient that readings timed in [fromMs, toMs] can affect: from the
 * reading before the change (its carry now ends elsewhere) to the next reading after it, or the
 * longest carry when there is none. Call after the raw rows are written, in the same transaction.
 */
export async function refreshMinuteRollup(trx: Conn, patientId: number, fromMs: number, toMs: number): Promise<void> {
  const prev = await lastBefore(trx, patientId, fromMs);
  const next = await current(trx, patientId)
    .andWhere('taken_at', '>', new Date(toMs))
    .orderBy('taken_at')
    .first('taken_at');
  const start = floorMinute(prev ? Math.min(fromMs, new Date(prev.taken_at).getTime()) : fromMs);
  const end = floorMinute(next ? new Date(next.taken_at).getTime() : toMs + MAX_CARRY_MS) + MINUTE_MS;
  const carryIn = await lastBefore(trx, patientId, start);
  const rows: ReadingRow[] = await current(trx, patientId)
    .andWhere('taken_at', '>=', new Date(start))
    .andWhere('taken_at', '<', new Date(end))
    .orderBy('taken_at')
    .orderBy('id')
    .select(READING_COLUMNS);
  const readings = (carryIn ? [carryIn, ...rows] : rows).map(toReading);
  await writeMinutes(trx, patientId, start, end, minuteRollup(readings, start, end));
}

async function writeMinutes(
  trx: Conn,
  patientId: number,
  start: number,
  end: number,
  minutes: MinuteRollup[],
): Promise<void> {
  // Derived rows, not clinical data: replaced wholesale for the recomputed minutes.
  await trx('observation_minutes')
    .where({ patient_id: patientId })
    .andWhere('minute', '>=', new Date(start))
    .andWhere('minute', '<', new Date(end))
    .delete();
  const rows = minutes.map((m) => toRow(patientId, m));
  for (let i = 0; i < rows.length; i += 2000) await trx('observation_minutes').insert(rows.slice(i, i + 2000));
}

/** Rebuilds every minute of one patient from all their current readings (backfill, demo seed, fixtures). */
export async function rebuildPatientRollup(conn: Conn, patientId: number): Promise<void> {
  const first = await current(conn, patientId).orderBy('taken_at').first('taken_at');
  if (!first) {
    await conn('observation_minutes').where({ patient_id: patientId }).delete();
    return;
  }
  const last = await current(conn, patientId).orderBy('taken_at', 'desc').first('taken_at');
  await refreshMinuteRollup(conn, patientId, new Date(first.taken_at).getTime(), new Date(last.taken_at).getTime());
}

export async function rebuildAllRollups(conn: Conn): Promise<void> {
  const ids: number[] = await conn('observations').distinct('patient_id').pluck('patient_id');
  for (const id of ids) await rebuildPatientRollup(conn, id);
}

interface MinuteRow {
  patient_id: number;
  minute: Date;
  trusted_n: number;
  untrusted_n: number;
  charted_n: number;
  spo2_n: number;
  spo2_min: number | null;
  spo2_max: number | null;
  spo2_sum: number;
  u_spo2_n: number;
  u_spo2_min: number | null;
  u_spo2_max: number | null;
  u_spo2_sum: number;
  hr_n: number;
  hr_min: number | null;
  hr_max: number | null;
  hr_sum: number;
  untrusted_ms: number;
  trusted_ms: string;
}

function toRow(patientId: number, m: MinuteRollup): MinuteRow {
  return {
    patient_id: patientId,
    minute: new Date(m.minute),
    trusted_n: m.trustedN,
    untrusted_n: m.untrustedN,
    charted_n: m.chartedN,
    spo2_n: m.spo2N,
    spo2_min: m.spo2Min,
    spo2_max: m.spo2Max,
    spo2_sum: m.spo2Sum,
    u_spo2_n: m.uSpo2N,
    u_spo2_min: m.uSpo2Min,
    u_spo2_max: m.uSpo2Max,
    u_spo2_sum: m.uSpo2Sum,
    hr_n: m.hrN,
    hr_min: m.hrMin,
    hr_max: m.hrMax,
    hr_sum: m.hrSum,
    untrusted_ms: Math.round(m.untrustedMs),
    trusted_ms: encodeTrustedMs(m.trustedMs),
  };
}

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

function fromRow(r: MinuteRow): MinuteRollup {
  return {
    minute: new Date(r.minute).getTime(),
    trustedN: r.trusted_n,
    untrustedN: r.untrusted_n,
    chartedN: r.charted_n,
    spo2N: r.spo2_n,
    spo2Min: num(r.spo2_min),
    spo2Max: num(r.spo2_max),
    spo2Sum: Number(r.spo2_sum),
    uSpo2N: r.u_spo2_n,
    uSpo2Min: num(r.u_spo2_min),
    uSpo2Max: num(r.u_spo2_max),
    uSpo2Sum: Number(r.u_spo2_sum),
    hrN: r.hr_n,
    hrMin: num(r.hr_min),
    hrMax: num(r.hr_max),
    hrSum: Number(r.hr_sum),
    untrustedMs: Number(r.untrusted_ms),
    trustedMs: decodeTrustedMs(r.trusted_ms),
  };
}

/** Current readings in [from, to) with the one before `from` whose carry may reach into it, oldest first. */
export async function readingsWithCarryIn(
  patientId: number,
  from: number,
  to: number,
  conn: Conn = db(),
): Promise<ReadingRow[]> {
  if (to <= from) return [];
  const [before, rows] = await Promise.all([
    lastBefore(conn, patientId, from),
    current(conn, patientId)
      .andWhere('taken_at', '>=', new Date(from))
      .andWhere('taken_at', '<', new Date(to))
      .orderBy('taken_at')
      .orderBy('id')
      .select(READING_COLUMNS),
  ]);
  return before ? [before, ...rows] : rows;
}

/** Rollup minutes of a patient in [from, to), oldest first. */
export async function minutesBetween(
  patientId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<MinuteRollup[]> {
  const rows: MinuteRow[] = await conn('observation_minutes')
    .where({ patient_id: patientId })
    .andWhere('minute', '>=', from)
    .andWhere('minute', '<', to)
    .orderBy('minute');
  return rows.map(fromRow);
}
