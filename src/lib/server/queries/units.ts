import { db } from './db.ts';

export interface UnitRow {
  id: number;
  code: string;
  name: string;
  hospital: string;
  time_zone: string;
}

export async function listUnits(onlyId?: number | null): Promise<UnitRow[]> {
  const q = db()<UnitRow>('units').orderBy('code').select('id', 'code', 'name', 'hospital', 'time_zone');
  return onlyId ? q.where({ id: onlyId }) : q;
}

/**
 * The time zone to show times in on pages that are not about one unit (admin pages): the user's own
 * unit's, else the zone most units of the hospital use, else UTC.
 */
export async function displayTimeZone(unitId: number | null | undefined): Promise<string> {
  if (unitId) {
    const own = await db()('units').where({ id: unitId }).first('time_zone');
    if (own) return own.time_zone;
  }
  const common = (await db()('units')
    .select('time_zone')
    .count({ n: '*' })
    .groupBy('time_zone')
    .orderBy('n', 'desc')
    .first()) as { time_zone?: string } | undefined;
  return common?.time_zone ?? 'UTC';
}

export interface CensusRow {
  unit_id: number;
  bed_id: number;
  bed_label: string;
  patient_id: number | null;
  given_name: string | null;
  family_name: string | null;
  mrn: string | null;
  admitted_at: Date | null;
  band_low: number | null;
  band_high: number | null;
}

/** Beds of the given units with the patient in each now and the current band: three joins, one query. */
export async function censusFor(unitIds: number[]): Promise<CensusRow[]> {
  if (unitIds.length === 0) return [];
  const latestOrder = db()('target_orders').select('patient_id').max('id as id').groupBy('patient_id').as('lo');
  return db()('beds as b')
    .leftJoin('bed_stays as s', 's.open_bed_id', 'b.id')
    .leftJoin('patients as p', 'p.id', 's.patient_id')
    .leftJoin(latestOrder, 'lo.patient_id', 'p.id')
    .leftJoin('target_orders as o', 'o.id', 'lo.id')
    .whereIn('b.unit_id', unitIds)
    .andWhere('b.active', true)
    .orderBy(['b.unit_id', 'b.position'])
    .select(
      'b.unit_id',
      'b.id as bed_id',
      'b.label as bed_label',
      'p.id as patient_id',
      'p.given_name',
      'p.family_name',
      'p.mrn',
      's.started_at as admitted_at',
      'o.low as band_low',
      'o.high as band_high',
    );
}
