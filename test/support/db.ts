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
export async function createUser(
  db: Knex,
  fields: { role: string; unitId?: number | null; password?: string; email?: string },
) {
  const password = fields.password ?? 'fixture-password';
  if (!hashCache.has(password)) hashCache.set(password, await bcrypt.hash(password, 4));
  const email = fields.email ?? `${unique(fields.role)}@fixture.example`;
  const [id] = await db('users').insert({
    email,
    name: `Fixture ${fields.role}`,
    role: fields.role,
    unit_id: fields.unitId ?? null,
    password_hash: hashCache.get(password),
  });
  return { id, email, password };
}

export async function createUnit(db: Knex, beds = 4) {
  const code = unique('U').slice(0, 16);
  const [unitId] = await db('units').insert({
    code,
    name: `Unit ${code}`,
    hospital: 'Fixture Hospital',
    time_zone: 'Europe/London',
  });
  const bedIds: number[] = [];
  for (let i = 0; i < beds; i++) {
    const [bedId] = await db('beds').insert({ unit_id: unitId, label: `F-${i + 1}`, position: i });
    bedIds.push(bedId);
  }
  return { unitId, code, bedIds };
}

export interface AdmittedPatientFields {
  bedId: number;
  /** When the open bed stay began. */
  since: Date | number;
  /** Ends the stay (discharged) at this time; open when left out. */
  until?: Date | number | null;
  /** A target order in force from `orderedAt`. */
  band?: {
    low: number;
    high: number;
    orderedBy: number;
    orderedAt: Date | number;
    reason?: string;
    news2Scale?: 1 | 2;
  };
  mrn?: string;
  givenName?: string;
  familyName?: string;
  dateOfBirth?: string;
}

/**
 * A patient put straight into the tables, as an admission leaves them: the patient row, a bed stay in
 * `bedId` from `since` (open unless `until`), and a target order when `band` is given. For fixtures
 * that arrange a past or a bed faster than the API allows; tests of admitting itself use the API.
 */
export async function createAdmittedPatient(
  db: Knex,
  f: AdmittedPatientFields,
): Promise<{ patientId: number; stayId: number; orderId: number | null; mrn: string }> {
  const mrn = f.mrn ?? unique('ADM').toUpperCase().slice(0, 20);
  const [patientId] = await db('patients').insert({
    mrn,
    given_name: f.givenName ?? 'Fixture',
    family_name: f.familyName ?? unique('Patient'),
    date_of_birth: f.dateOfBirth ?? '1960-01-01',
  });
  const until = f.until == null ? null : new Date(f.until);
  const [stayId] = await db('bed_stays').insert({
    patient_id: patientId,
    bed_id: f.bedId,
    started_at: new Date(f.since),
    ended_at: until,
    end_reason: until ? 'discharged' : null,
  });
  let orderId: number | null = null;
  if (f.band) {
    const b = f.band;
    [orderId] = await db('target_orders').insert({
      patient_id: patientId,
      low: b.low,
      high: b.high,
      news2_scale: b.news2Scale ?? 1,
      reason: b.reason ?? 'fixture',
      ordered_by: b.orderedBy,
      ordered_at: new Date(b.orderedAt),
    });
  }
  return { patientId, stayId, orderId, mrn };
}

export async function countRows(db: Knex, table: string): Promise<number> {
  const [{ n }] = await db(table).count<{ n: number }[]>({ n: '*' });
  return Number(n);
}
