/**
 * The bedside-monitor feed: a batch of readings from one bed's gateway goes to whoever was in
 * that bed at each reading's time. All or nothing: one bad reading refuses the batch (zod, before
 * any write); duplicates of stored times are skipped by the database, so resending is safe.
 */
import type { z } from 'zod';
import { runObservationHooks } from '~/lib/server/charting/observations.ts';
import { toDeviceReading, type ingestBatchSchema } from '~/lib/imports/reading.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { lockPatient } from '~/lib/server/queries/patients.ts';
import { refreshMinuteRollup } from '~/lib/server/queries/rollup.ts';
import { insertDeviceReadings, staysInBedBetween, touchDeviceKey, type DeviceObservationRow } from '~/lib/server/queries/devices.ts';
import type { authenticateDeviceKey } from './keys.ts';

export interface IngestResult {
  bed: string; received: number; stored: number; duplicates: number; withoutPatient: number;
  /** Plain words for the gateway's log, e.g. why nothing was stored. */
  message: string;
}

type Key = Awaited<ReturnType<typeof authenticateDeviceKey>>;
type Batch = z.output<ReturnType<typeof ingestBatchSchema>>;

export async function ingestBatch(key: Key, batch: Batch, now = new Date()): Promise<IngestResult> {
  const readings = batch.readings.map(toDeviceReading);
  let min = Infinity;
  let max = -Infinity;
  for (const r of readings) {
    const t = r.at.getTime();
    if (t < min) min = t;
    if (t > max) max = t;
  }
  return withTransactionRetry(async (trx) => {
    const stays = await staysInBedBetween(trx, key.bed_id, new Date(min), new Date(max));
    const byPatient = new Map<number, DeviceObservationRow[]>();
    let withoutPatient = 0;
    for (const r of readings) {
      const t = r.at.getTime();
      const stay = stays.find((s) => new Date(s.started_at).getTime() <= t && (s.ended_at === null || t < new Date(s.ended_at).getTime()));
      if (!stay) { withoutPatient++; continue; }
      let rows = byPatient.get(stay.patient_id);
      if (!rows) byPatient.set(stay.patient_id, (rows = []));
      rows.push({
        patient_id: stay.patient_id, bed_id: key.bed_id, taken_at: r.at, source: 'device', spo2: r.spo2, heart_rate: r.heartRate,
        perfusion_index: r.perfusionIndex, trace: r.trace, recorded_at: now,
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
        let first = Infinity;
        let last = -Infinity;
        for (const r of rows) {
          const t = r.taken_at.getTime();
          if (t < first) first = t;
          if (t > last) last = t;
        }
        await refreshMinuteRollup(trx, patientId, first, last);
        await runObservationHooks(trx, patientId, now);
      }
    }
    await touchDeviceKey(trx, key.id, now);
    const duplicates = readings.length - withoutPatient - stored;
    const parts = [`${stored} stored`];
    if (duplicates > 0) parts.push(`${duplicates} already stored (ignored)`);
    if (withoutPatient > 0) parts.push(`${withoutPatient} not stored: bed ${key.bed_label} had no patient at ${withoutPatient === readings.length ? 'those times' : 'some of those times'}`);
    return { bed: key.bed_label, received: readings.length, stored, duplicates, withoutPatient, message: parts.join('; ') };
  });
}
