/** Direct database access for tests: arranging fixtures and checking what was (or was not) stored. */
import knexFactory, { type Knex } from 'knex';
import bcrypt from 'bcryptjs';
import { connectionFromEnv } from '../../knexfile.ts';
import { rebuildPatientRollup } from '../../src/lib/server/queries/rollup.ts';

/** Fixtures that insert readings straight into the table rebuild the patient's per-minute rollup (the app's writers keep it). */
export { rebuildPatientRollup };

export function testDb(database = process.env.DB_NAME): Knex {
  return knexFactory(connectionFromEnv({ ...process.env, DB_NAME: database, DB_POOL_MAX: '4' }));
}

let counter = 0;
/** A short unique suffix so fixtures from different tests never collide. */
export function unique(prefix: string): string {
  counter += 1;
  return `${prefix}${Date.now().toString(36).slice(-5)}${counter}`;
}

const hashCache = new Map<string, string>();
export async function createUser(db: Knex, fields: { role: string; unitId?: number | null; password?: string; email?: string }) {
  const password = fields.password ?? 'fixture-password';
  if (!hashCache.has(password)) hashCache.set(password, await bcrypt.hash(password, 4));
  const email = fields.email ?? `${unique(fields.role)}@fixture.example`;
  const [id] = await db('users').insert({ email, name: `Fixture ${fields.role}`, role: fields.role, unit_id: fields.unitId ?? null, password_hash: hashCache.get(password) });
  return { id, email, password };
}

export async function createUnit(db: Knex, beds = 4) {
  const code = unique('U').slice(0, 16);
  const [unitId] = await db('units').insert({ code, name: `Unit ${code}`, hospital: 'Fixture Hospital', time_zone: 'Europe/London' });
  const bedIds: number[] = [];
  for (let i = 0; i < beds; i++) {
    const [bedId] = await db('beds').insert({ unit_id: unitId, label: `F-${i + 1}`, position: i });
    bedIds.push(bedId);
  }
  return { unitId, code, bedIds };
}

export async function countRows(db: Knex, table: string): Promise<number> {
  const [{ n }] = await db(table).count<{ n: number }[]>({ n: '*' });
  return Number(n);
}
