import type { Knex } from 'knex';
import { db } from './db.ts';
import type { ReadingRow } from './observations.ts';

export interface BoardBedRow {
  bed_id: number; bed_label: string; patient_id: number | null; given_name: string | null; family_name: string | null; mrn: string | null;
  co2_retention_risk: number | null; band_low: number | null; band_high: number | null; news2_scale: number | null; ordered_at: Date | null;
  nurse_id: number | null; nurse_name: string | null;
}

/** Every active bed of a unit with its patient, current band and assigned nurse: one query. */
export async function boardBeds(unitId: number): Promise<BoardBedRow[]> {
  const k = db();
  const latestOrder = k('target_orders').select('patient_id').max('id as id').groupBy('patient_id').as('lo');
  return k('beds as b')
    .leftJoin('bed_stays as s', 's.open_bed_id', 'b.id')
    .leftJoin('patients as p', 'p.id', 's.patient_id')
    .leftJoin(latestOrder, 'lo.patient_id', 'p.id')
    .leftJoin('target_orders as o', 'o.id', 'lo.id')
    .leftJoin('bed_assignments as a', 'a.open_bed_id', 'b.id')
    .leftJoin('users as n', 'n.id', 'a.nurse_id')
    .where({ 'b.unit_id': unitId, 'b.active': true })
    .orderBy('b.position')
    .select('b.id as bed_id', 'b.label as bed_label', 'p.id as patient_id', 'p.given_name', 'p.family_name', 'p.mrn', 'p.co2_retention_risk',
      'o.low as band_low', 'o.high as band_high', 'o.news2_scale', 'o.ordered_at', 'n.id as nurse_id', 'n.name as nurse_name');
}

export type BoardReadingRow = ReadingRow & { patient_id: number };

const readingColumns = ['patient_id', 'taken_at', 'source', 'spo2', 'heart_rate', 'resp_rate', 'fio2', 'fio2_estimated', 'device', 'flow_lpm', 'trace', 'perfusion_index'];

/**
 * Recent current readings of many patients in one query: device and import readings since
 * `deviceSince`, charted obs since `chartedSince` (hourly obs need a longer look back for the
 * consecutive-charted rule). Ordered by patient, then time.
 */
export async function recentReadings(patientIds: number[], since: { device: Date; charted: Date }, k: Knex | Knex.Transaction = db()): Promise<BoardReadingRow[]> {
  if (patientIds.length === 0) return [];
  const charted = k('observations').select(readingColumns)
    .whereIn('patient_id', patientIds).andWhere({ source: 'charted', status: 'current' }).andWhere('taken_at', '>=', since.charted);
  const streamed = k('observations').select(readingColumns)
    .whereIn('patient_id', patientIds).whereIn('source', ['device', 'import']).andWhere('status', 'current').andWhere('taken_at', '>=', since.device);
  return k.select('*').from(charted.unionAll(streamed, true).as('r')).orderBy([{ column: 'patient_id' }, { column: 'taken_at' }]);
}

export interface LastChartedRow extends BoardReadingRow { systolic: number | null; temperature: string | number | null; consciousness: string | null }

/** The newest current charted obs of each patient: one query. */
export async function lastChartedPerPatient(patientIds: number[]): Promise<LastChartedRow[]> {
  if (patientIds.length === 0) return [];
  const k = db();
  const newest = k('observations').whereIn('patient_id', patientIds).andWhere({ source: 'charted', status: 'current' })
    .groupBy('patient_id').select('patient_id').max('taken_at as taken_at').as('m');
  // Two obs may share the newest time (a correction keeps the time): the higher id wins in code.
  return k('observations as o')
    .join(newest, (j) => j.on('m.patient_id', 'o.patient_id').andOn('m.taken_at', 'o.taken_at'))
    .where({ 'o.source': 'charted', 'o.status': 'current' })
    .orderBy('o.id')
    .select('o.patient_id', 'o.taken_at', 'o.source', 'o.spo2', 'o.heart_rate', 'o.resp_rate', 'o.fio2', 'o.fio2_estimated', 'o.device', 'o.flow_lpm',
      'o.trace', 'o.perfusion_index', 'o.systolic', 'o.temperature', 'o.consciousness');
}
