/** Units and beds as administrators change them. */
import type { Knex } from 'knex';
import { db } from './db.ts';

type Trx = Knex.Transaction;

export interface AdminUnitRow {
  id: number;
  code: string;
  name: string;
  hospital: string;
  time_zone: string;
}
export interface AdminBedRow {
  id: number;
  unit_id: number;
  label: string;
  position: number;
  active: number | boolean;
  retired_at: Date | null;
  occupied: number;
}

export async function unitsWithBeds(): Promise<{ units: AdminUnitRow[]; beds: AdminBedRow[] }> {
  const units = await db()<AdminUnitRow>('units').orderBy('code').select('id', 'code', 'name', 'hospital', 'time_zone');
  const beds = await db()('beds as b')
    .leftJoin('bed_stays as s', 's.open_bed_id', 'b.id')
    .orderBy([
      { column: 'b.unit_id' },
      { column: 'b.active', order: 'desc' },
      { column: 'b.position' },
      { column: 'b.id' },
    ])
    .select(
      'b.id',
      'b.unit_id',
      'b.label',
      'b.position',
      'b.active',
      'b.retired_at',
      db().raw('s.id IS NOT NULL as occupied'),
    );
  return { units, beds };
}

export async function lockUnitByCode(trx: Trx, code: string): Promise<AdminUnitRow | undefined> {
  return trx<AdminUnitRow>('units').where({ code }).forUpdate().first('id', 'code', 'name', 'hospital', 'time_zone');
}

export async function insertUnit(trx: Trx, row: Omit<AdminUnitRow, 'id'>): Promise<number> {
  const [id] = await trx('units').insert(row);
  return id;
}

export async function updateUnit(
  trx: Trx,
  id: number,
  fields: Partial<Pick<AdminUnitRow, 'name' | 'hospital'>>,
): Promise<void> {
  await trx('units').where({ id }).update(fields);
}

export async function lockBedsOfUnit(trx: Trx, unitId: number): Promise<AdminBedRow[]> {
  return trx('beds')
    .where({ unit_id: unitId })
    .orderBy('position')
    .forUpdate()
    .select('id', 'unit_id', 'label', 'position', 'active', 'retired_at');
}

export async function insertBed(trx: Trx, row: { unit_id: number; label: string; position: number }): Promise<number> {
  const [id] = await trx('beds').insert(row);
  return id;
}

export async function updateBed(trx: Trx, id: number, fields: Record<string, unknown>): Promise<void> {
  await trx('beds').where({ id }).update(fields);
}

/** The open stay in a bed, read under lock so an admission and a retirement cannot cross. */
export async function openStayInBedLocked(trx: Trx, bedId: number): Promise<{ id: number } | undefined> {
  return trx('bed_stays').where({ bed_id: bedId }).whereNull('ended_at').forUpdate().first('id');
}
