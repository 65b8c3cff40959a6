/** Recent current readings of many patients, and each one's newest charted obs: what the board, the escalation engine and the sweep judge from. */
import type { Knex } from 'knex';
import { db } from './db.ts';
import type { ChartedObsRow, ReadingRow } from './observations.ts';

export type PatientReadingRow = ReadingRow & { patient_id: number };

const readingColumns = [
  'patient_id',
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

/**
 * Recent current readings of many patients in one query: device and import readings since
 * `deviceSince`, charted obs since `chartedSince` (hourly obs need a longer look back for the
 * consecutive-charted rule). Ordered by patient, then time.
 */
export async function recentReadings(
  patientIds: number[],
  since: { device: Date; charted: Date },
  k: Knex | Knex.Transaction = db(),
): Promise<PatientReadingRow[]> {
  if (patientIds.length === 0) return [];
  const charted = k('observations')
    .select(readingColumns)
    .whereIn('patient_id', patientIds)
    .andWhere({ source: 'charted', status: 'current' })
    .andWhere('taken_at', '>=', since.charted);
  const streamed = k('observations')
    .select(readingColumns)
    .whereIn('patient_id', patientIds)
    .whereIn('source', ['device', 'import'])
    .andWhere('status', 'current')
    .andWhere('taken_at', '>=', since.device);
  return k
    .select('*')
    .from(charted.unionAll(streamed, true).as('r'))
    .orderBy([{ column: 'patient_id' }, { column: 'taken_at' }]);
}

export type LastChartedRow = ChartedObsRow & { patient_id: number };

/** The newest current charted obs of each patient: one query. */
export async function lastChartedPerPatient(patientIds: number[]): Promise<LastChartedRow[]> {
  if (patientIds.length === 0) return [];
  const k = db();
  const newest = k('observations')
    .whereIn('patient_id', patientIds)
    .andWhere({ source: 'charted', status: 'current' })
    .groupBy('patient_id')
    .select('patient_id')
    .max('taken_at as taken_at')
    .as('m');
  // Two obs may share the newest time (a correction keeps the time): the higher id wins in code.
  return k('observations as o')
    .join(newest, (j) => j.on('m.patient_id', 'o.patient_id').andOn('m.taken_at', 'o.taken_at'))
    .where({ 'o.source': 'charted', 'o.status': 'current' })
    .orderBy('o.id')
    .select(
      'o.patient_id',
      'o.taken_at',
      'o.source',
      'o.spo2',
      'o.heart_rate',
      'o.resp_rate',
      'o.fio2',
      'o.fio2_estimated',
      'o.device',
      'o.flow_lpm',
      'o.trace',
      'o.perfusion_index',
      'o.systolic',
      'o.temperature',
      'o.consciousness',
    );
}
