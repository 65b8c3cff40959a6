/**
 * The role matrix, generated from ONE table (role-matrix.table.ts): every route × eight callers.
 * It also reads src/pages/api: a route file (or a method in it) without a row fails here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { Knex } from 'knex';
import type { HttpSession } from '../support/app.ts';
import { createAdmittedPatient, createUnit, testDb } from '../support/db.ts';
import { signInPeople } from '../support/people.ts';
import { CALLERS, ROLE_MATRIX, type Caller, type MatrixRow } from './role-matrix.table.ts';

const API_DIR = 'src/pages/api';

/** `METHOD /api/route` for every exported handler of every route file (files starting with _ are helpers). */
function routesOnDisk(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = join(dir, name);
      if (statSync(full).isDirectory()) {
        walk(full);
        continue;
      }
      if (!/\.(ts|js)$/.test(name) || name.startsWith('_')) continue;
      const route =
        '/api/' +
        relative(API_DIR, full)
          .replace(/\.(ts|js)$/, '')
          .replace(/(^|\/)index$/, '');
      const src = readFileSync(full, 'utf8');
      for (const m of src.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE)\b/g))
        out.push(`${m[1]} ${route.replace(/\/$/, '')}`);
    }
  };
  walk(API_DIR);
  return out.sort();
}

describe('the role matrix table', () => {
  it('has exactly one row per route and method under src/pages/api', () => {
    const inTable = ROLE_MATRIX.map((r) => r.route);
    expect(new Set(inTable).size, 'duplicate rows').toBe(inTable.length);
    const onDisk = routesOnDisk();
    expect(
      onDisk.filter((r) => !inTable.includes(r)),
      'routes without a row in test/integration/role-matrix.table.ts',
    ).toEqual([]);
    expect(
      inTable.filter((r) => !onDisk.includes(r)),
      'rows for routes that no longer exist',
    ).toEqual([]);
  });

  it('has eight statuses in every row', () => {
    for (const row of ROLE_MATRIX) expect(row.expect.trim().split(/\s+/), row.route).toHaveLength(CALLERS.length);
  });
});

describe('every route × every caller', () => {
  let db: Knex;
  const s = {} as Record<Caller, HttpSession>;
  const fx: Record<string, string> = {};

  beforeAll(async () => {
    db = testDb();
    const a = await createUnit(db, 2);
    const b = await createUnit(db, 1);
    const people = await signInPeople(db, {
      nurse: ['nurse', a.unitId],
      xNurse: ['nurse', b.unitId],
      charge: ['charge', a.unitId],
      xCharge: ['charge', b.unitId],
      int: ['intensivist', null],
      out: ['outreach', null],
      admin: ['admin', null],
    });
    Object.assign(s, people.sessions);
    const { patientId: patient } = await createAdmittedPatient(db, {
      bedId: a.bedIds[0],
      since: Date.now() - 3_600_000,
    });
    const [obs] = await db('observations').insert({
      patient_id: patient,
      bed_id: a.bedIds[0],
      taken_at: new Date(Date.now() - 600_000),
      recorded_at: new Date(),
      source: 'charted',
      spo2: 95,
      device: 'room_air',
      fio2: 0.21,
      trace: 'clean',
      recorded_by: people.ids.nurse,
    });
    Object.assign(fx, {
      patient: String(patient),
      obs: String(obs),
      bed: String(a.bedIds[1]),
      unit: a.code,
      missing: '987654321',
    });
  });
  afterAll(async () => {
    await db.destroy();
  });

  async function call(caller: Caller, row: MatrixRow): Promise<number> {
    const [method] = row.route.split(' ');
    const path = row.path.replace(/\{(\w+)\}/g, (_, k: string) => fx[k]);
    const session = s[caller];
    const body = row.body;
    let res: Response;
    if (body === undefined) res = await session.request(path, { method });
    else if ('form' in body)
      res = await session.request(path, {
        method,
        headers: { 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams(body.form).toString(),
      });
    else if ('csv' in body)
      res = await session.request(path, { method, headers: { 'content-type': 'text/csv' }, body: body.csv });
    else res = await session.request(path, { method, json: body });
    await res.arrayBuffer();
    return res.status;
  }

  it('answers each cell as the table says (and stores nothing for PROBE bodies)', async () => {
    const counts = async () =>
      Promise.all(
        [
          'patients',
          'observations',
          'target_orders',
          'bed_stays',
          'device_keys',
          'pleth_checks',
          'observation_imports',
        ].map(async (t) => Number((await db(t).count({ n: '*' }).first())!.n)),
      );
    const before = await counts();
    const wrong: string[] = [];
    for (const row of ROLE_MATRIX) {
      const want = row.expect.trim().split(/\s+/).map(Number);
      const got: number[] = [];
      for (const caller of CALLERS) got.push(await call(caller, row));
      if (got.join(' ') !== want.join(' '))
        wrong.push(`${row.route}\n  want ${want.join(' ')}\n  got  ${got.join(' ')}`);
    }
    expect(wrong, `cells that differ (columns: ${CALLERS.join(' ')})`).toEqual([]);
    expect(await counts()).toEqual(before);
  });
});
