/**
 * Clinical records that are corrected by new rows, never edited away (charted obs, blood gases):
 * the same statements on each table — insert, lock, mark superseded / entered in error (only while
 * current), and list with who recorded it, who marked it and which row replaced it.
 */
import type { Knex } from 'knex';
import type { Conn } from './patients.ts';

export interface RecordMark {
  status: 'superseded' | 'entered_in_error';
  status_reason: string;
  status_by: number;
  status_at: Date;
}

export function correctedRecords<Row extends object>(table: 'observations' | 'blood_gases', alias: string) {
  return {
    async insert(trx: Knex.Transaction, row: object): Promise<number> {
      const [id] = await trx(table).insert(row);
      return Number(id);
    },
    lock(trx: Knex.Transaction, id: number): Promise<Row | undefined> {
      return trx(table).where('id', id).forUpdate().first() as Promise<Row | undefined>;
    },
    async mark(trx: Knex.Transaction, id: number, fields: RecordMark): Promise<void> {
      await trx(table).where({ id, status: 'current' }).update(fields);
    },
    /** Rows of `table as alias` with `recorded_by_name`, `status_by_name` and `replaced_by_id`. */
    listQuery(conn: Conn) {
      return conn(`${table} as ${alias}`)
        .leftJoin('users as rb', 'rb.id', `${alias}.recorded_by`)
        .leftJoin('users as sb', 'sb.id', `${alias}.status_by`)
        .leftJoin(`${table} as r`, 'r.replaces_id', `${alias}.id`)
        .select(`${alias}.*`, 'rb.name as recorded_by_name', 'sb.name as status_by_name', 'r.id as replaced_by_id');
    },
  };
}
