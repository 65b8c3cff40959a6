/**
 * The bedside-monitor feed: a batch of readings from one bed's gateway goes to whoever was in
 * that bed at each reading's time. All or nothing: one bad reading refuses the batch (zod, before
 * any write); duplicates of stored times are skipped by the database, so resending is safe.
 *
 * The one path for device readings: `POST /api/ingest` (device key) and the HL7 v2 listener
 * (gateway + PV1-3 bed) both call `ingestReadings`, so validation, idempotency by bed and time,
 * the transaction and the escalation checks are the same code for both.
 */
import { stayAt } from '~/lib/patients/stays.ts';
import { timeSpan } from '~/lib/sorted.ts';
import { ZodError, type z } from 'zod';
import { runObservationHooks } from '~/lib/server/charting/observations.ts';
import { ingestBatchSchema, toDeviceReading } from '~/lib/imports/reading.ts';
import type { Conn } from '~/lib/server/queries/patients.ts';
import { zodFields } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { lockPatient } from '~/lib/server/queries/patients.ts';
import { refreshMinuteRollup } from '~/lib/server/queries/rollup.ts';
import { insertDeviceReadings, staysInBedBetween, type DeviceObservationRow } from '~/lib/server/queries/devices.ts';

export interface IngestResult {
  bed: string;
  received: number;
  stored: number;
  duplicates: number;
  withoutPatient: number;
  /** Plain words for the gateway's log, e.g. why nothing was stored. */
  message: string;
}

/** Where a batch comes from: the bed it speaks for, and how to mark the sender as seen (in the batch's transaction). */
export interface IngestSource {
  bed_id: number;
  bed_label: string;
  touch: (trx: Conn, at: Date) => Promise<void>;
}

type Batch = z.output<ReturnType<typeof ingestBatchSchema>>;

/** A batch refused by validation: nothing was stored. `fields` name readings by index, e.g. `readings.12.spo2`. */
export class BatchRefused extends Error {
  constructor(
    readonly count: number,
    readonly fields: Record<string, string>,
    readonly issues: z.ZodIssue[],
  ) {
    const [firstField, firstReason] = Object.entries(fields)[0] ?? ['_', 'invalid'];
    const more = count > MAX_FIELDS ? ` (the first ${MAX_FIELDS} are listed)` : '';
    super(`${count} problem(s) in the batch${more}; nothing was stored. First: ${firstField}: ${firstReason}`);
  }
}

/** A batch of 3,600 bad readings would otherwise answer with 3,600 reasons; the first ones say enough. */
const MAX_FIELDS = 100;

/** Validates a raw batch (`{ readings: [...] }`) against the feed's schema; throws BatchRefused. */
export function parseBatch(body: unknown, now: Date): Batch {
  try {
    return ingestBatchSchema(now).parse(body);
  } catch (err) {
    if (!(err instanceof ZodError)) throw err;
    const issues = err.issues.slice(0, MAX_FIELDS);
    throw new BatchRefused(err.issues.length, zodFields(new ZodError(issues)), issues);
  }
}

/** The shared entry: validate, then store in one transaction (see `ingestBatch`). */
export async function ingestReadings(source: IngestSource, body: unknown, now = new Date()): Promise<IngestResult> {
  return ingestBatch(source, parseBatch(body, now), now);
}

async function ingestBatch(key: IngestSource, batch: Batch, now: Date): Promise<IngestResult> {
  const readings = batch.readings.map(toDeviceReading);
  const span = timeSpan(readings, (r) => r.at.getTime());
  return withTransactionRetry(async (trx) => {
    const stays = await staysInBedBetween(trx, key.bed_id, new Date(span.first), new Date(span.last));
    const byPatient = new Map<number, DeviceObservationRow[]>();
    let withoutPatient = 0;
    for (const r of readings) {
      const t = r.at.getTime();
      const stay = stayAt(stays, t);
      if (!stay) {
        withoutPatient++;
        continue;
      }
      let rows = byPatient.get(stay.patient_id);
      if (!rows) {
        rows = [];
        byPatient.set(stay.patient_id, rows);
      }
      rows.push({
        patient_id: stay.patient_id,
        bed_id: key.bed_id,
        taken_at: r.at,
        source: 'device',
        spo2: r.spo2,
        heart_rate: r.heartRate,
        perfusion_index: r.perfusionIndex,
        trace: r.trace,
        recorded_at: now,
      });
    }
    let stored = 0;
    for (const [patientId, rows] of byPatient) {
      // Patient row lock before inserting, the same order as every obs writer (no deadlock with
      // the foreign key's shared lock); it also serialises this patient's escalation checks.
      await lockPatient(trx, patientId);
      const n = await insertDeviceReadings(trx, rows);
      stored += n;
      if (n > 0) {
        // The per-minute rollup and the escalation checks, once per patient per batch, in the readings' transaction.
        const { first, last } = timeSpan(rows, (r) => r.taken_at.getTime());
        await refreshMinuteRollup(trx, patientId, first, last);
        await runObservationHooks(trx, patientId, now);
      }
    }
    await key.touch(trx, now);
    const duplicates = readings.length - withoutPatient - stored;
    const parts = [`${stored} stored`];
    if (duplicates > 0) parts.push(`${duplicates} already stored (ignored)`);
    if (withoutPatient > 0)
      parts.push(
        `${withoutPatient} not stored: bed ${key.bed_label} had no patient at ${withoutPatient === readings.length ? 'those times' : 'some of those times'}`,
      );
    return {
      bed: key.bed_label,
      received: readings.length,
      stored,
      duplicates,
      withoutPatient,
      message: parts.join('; '),
    };
  });
}
