import type { Knex } from 'knex';

/** The nurse assigned to a bed now, or null. */
export async function bedsideNurseName(trx: Knex.Transaction, bedId: number): Promise<string | null> {
  const row = await trx('bed_assignments as a')
    .join('users as u', 'u.id', 'a.nurse_id')
    .where('a.open_bed_id', bedId)
    .first('u.name');
  return row?.name ?? null;
}
