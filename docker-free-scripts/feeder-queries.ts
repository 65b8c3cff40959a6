/**
 * The demo feeder's own queries (where each demo bed carries on, its keys of the last run). Demo
 * only: kept beside the feeder so production query modules hold nothing the app does not use.
 */
import { db } from '../src/lib/server/queries/db.ts';
import type { Conn } from '../src/lib/server/queries/patients.ts';

/** Occupied beds with the patient's latest device readings: where the demo feeder carries on. */
export async function occupiedBedsWithDeviceReadings(
  unitCodes: string[],
  conn: Conn = db(),
): Promise<{ bed_id: number; bed_label: string; unit_code: string; patient_id: number }[]> {
  return conn('bed_stays as s')
    .join('beds as b', 'b.id', 's.open_bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .whereIn('u.code', unitCodes)
    .whereExists((q) =>
      q
        .select(conn.raw('1'))
        .from('observations as o')
        .whereRaw('o.patient_id = s.patient_id')
        .andWhere('o.source', 'device'),
    )
    .orderBy('b.id')
    .select('b.id as bed_id', 'b.label as bed_label', 'u.code as unit_code', 's.patient_id');
}

export async function recentDeviceReadings(patientId: number, limit: number, conn: Conn = db()) {
  return conn('observations')
    .where({ patient_id: patientId, source: 'device', status: 'current' })
    .orderBy('taken_at', 'desc')
    .limit(limit)
    .select('taken_at', 'spo2', 'heart_rate', 'perfusion_index', 'trace');
}

/** Live keys with a given label (the feeder's own, revoked when it restarts). */
export async function liveKeyIdsLabelled(trx: Conn, label: string): Promise<number[]> {
  return trx('device_keys').where({ label }).whereNull('revoked_at').pluck('id');
}
