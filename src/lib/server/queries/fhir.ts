import { db } from './db.ts';
import type { Conn } from './patients.ts';
import type { ObservationIn } from '~/lib/fhir/r4.ts';

/**
 * A patient's observations in [from, to], every status, oldest first, one page after `after`
 * (taken_at, id keyset: stable while rows are added, and no OFFSET to grow with the window).
 */
export async function observationsForExport(
  patientId: number,
  from: Date,
  to: Date,
  after: { at: Date; id: number } | null,
  limit: number,
  conn: Conn = db(),
): Promise<ObservationIn[]> {
  const q = conn('observations as o')
    .leftJoin('users as rb', 'rb.id', 'o.recorded_by')
    .leftJoin('observations as r', 'r.replaces_id', 'o.id')
    .where('o.patient_id', patientId)
    .andWhere('o.taken_at', '>=', from)
    .andWhere('o.taken_at', '<=', to);
  if (after)
    q.andWhere((w) =>
      w
        .where('o.taken_at', '>', after.at)
        .orWhere((x) => x.where('o.taken_at', after.at).andWhere('o.id', '>', after.id)),
    );
  return q
    .orderBy('o.taken_at')
    .orderBy('o.id')
    .limit(limit)
    .select(
      'o.id',
      'o.taken_at',
      'o.source',
      'o.status',
      'o.replaces_id',
      'r.id as replaced_by_id',
      'o.status_reason',
      'o.spo2',
      'o.heart_rate',
      'o.resp_rate',
      'o.fio2',
      'o.fio2_estimated',
      'o.flow_lpm',
      'o.systolic',
      'o.temperature',
      'o.trace',
      'rb.name as recorded_by_name',
    );
}
