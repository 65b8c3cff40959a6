import { db } from './db.ts';

export interface BoardBedRow {
  bed_id: number;
  bed_label: string;
  patient_id: number | null;
  given_name: string | null;
  family_name: string | null;
  mrn: string | null;
  co2_retention_risk: number | null;
  band_low: number | null;
  band_high: number | null;
  news2_scale: number | null;
  ordered_at: Date | null;
  nurse_id: number | null;
  nurse_name: string | null;
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
    .select(
      'b.id as bed_id',
      'b.label as bed_label',
      'p.id as patient_id',
      'p.given_name',
      'p.family_name',
      'p.mrn',
      'p.co2_retention_risk',
      'o.low as band_low',
      'o.high as band_high',
      'o.news2_scale',
      'o.ordered_at',
      'n.id as nurse_id',
      'n.name as nurse_name',
    );
}
