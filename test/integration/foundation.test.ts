import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { HttpSession, signedIn } from '../support/app.ts';
import { startInstance } from '../support/instance.ts';
import { createUnit, createUser, testDb } from '../support/db.ts';
import { demoPatients, demoUnits, demoUsers } from '../../src/lib/demo/scenario.ts';

let db: Knex;
beforeAll(() => {
  db = testDb();
});
afterAll(async () => {
  await db.destroy();
});

describe('GET /api/health', () => {
  it('answers 200 {db:"ok"} when MariaDB answers', async () => {
    const res = await new HttpSession().get('/api/health');
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ db: 'ok' });
  });
});

describe('GET /api/health when the database is down', () => {
  it('answers 503 with a clear message', async () => {
    // An instance of the same build pointed at a port where no MariaDB listens.
    const instance = await startInstance(Number(new URL(process.env.APP_URL!).port) + 7, { DB_PORT: '9' });
    try {
      const res = await fetch(`${instance.url}/api/health`);
      expect(res.status).toBe(503);
      const body = await res.json();
      expect(body.error.code).toBe('database_unavailable');
      expect(body.error.message).toMatch(/database is not answering/);
    } finally {
      await instance.stop();
    }
  });
});

describe('demo seed', () => {
  it('holds the invented hospital: two units with 12 and 8 beds, one account per role', async () => {
    // Other test files add fixture units of their own; the demo is the Harbourside units.
    const units = await db('units')
      .where({ hospital: 'Harbourside General' })
      .orderBy('code')
      .select('code', 'name', 'hospital');
    expect(units.map((u) => u.name)).toEqual(['Level 4 ICU', 'Level 5 HDU']);
    expect(new Set(units.map((u) => u.hospital))).toEqual(new Set(['Harbourside General']));
    const beds: { code: string; n: number }[] = await db('beds as b')
      .join('units as u', 'u.id', 'b.unit_id')
      .where('u.hospital', 'Harbourside General')
      .groupBy('u.code')
      .select('u.code')
      .count({ n: '*' });
    expect(Object.fromEntries(beds.map((r) => [r.code, Number(r.n)]))).toEqual({ L4ICU: 12, L5HDU: 8 });
    for (const role of ['nurse', 'charge', 'intensivist', 'outreach', 'admin']) {
      expect(
        await db('users')
          .where({ email: `${role}@harbourside.example`, role })
          .first(),
      ).toBeTruthy();
    }
    expect(demoUnits.length).toBe(2);
    expect(await db('patients').where('mrn', 'like', 'HG%').count({ n: '*' }).first()).toEqual({
      n: demoPatients.length,
    });
  });

  it('holds about 48 h of obs, charted and device', async () => {
    const span = await db('observations as o')
      .join('patients as p', 'p.id', 'o.patient_id')
      .where('p.mrn', 'like', 'HG%')
      .select(db.raw('TIMESTAMPDIFF(HOUR, MIN(o.taken_at), MAX(o.taken_at)) as hours'))
      .first();
    expect(Number(span.hours)).toBeGreaterThanOrEqual(47);
    const sources = await db('observations as o')
      .join('patients as p', 'p.id', 'o.patient_id')
      .where('p.mrn', 'like', 'HG%')
      .whereIn('o.source', ['charted', 'device'])
      .distinct('o.source')
      .pluck('o.source');
    expect(sources.sort()).toEqual(['charted', 'device']);
  });
});

describe('sign-in', () => {
  it("puts each demo user's role and unit in the session (GET /api/me)", async () => {
    for (const user of demoUsers.filter((u) =>
      u.email.split('@')[0].match(/^(nurse|charge|intensivist|outreach|admin)$/),
    )) {
      const session = await signedIn(user.email);
      const me = await (await session.get('/api/me')).json();
      expect(me).toMatchObject({ email: user.email, name: user.name, role: user.role });
      expect(me.unit?.code ?? null).toBe(user.unitCode);
    }
  });

  it('refuses a wrong password without a session', async () => {
    const session = new HttpSession();
    const result = await session.signIn('nurse@harbourside.example', 'not-the-password');
    expect(result.ok).toBe(false);
    expect(result.url).toContain('error=CredentialsSignin');
    expect((await session.get('/api/me')).status).toBe(401);
  });

  it('works when the app is reached at localhost as well as 127.0.0.1', async () => {
    const session = new HttpSession(process.env.APP_URL!.replace('127.0.0.1', 'localhost'));
    const result = await session.signIn('charge@harbourside.example');
    expect(result.ok).toBe(true);
    expect((await session.get('/api/me')).status).toBe(200);
  });

  it('locks after five wrong passwords in a row, for 15 minutes, even with the right password; an admin unlocks', async () => {
    const { unitId } = await createUnit(db, 1);
    const user = await createUser(db, { role: 'nurse', unitId });
    for (let i = 1; i <= 4; i++) {
      const r = await new HttpSession().signIn(user.email, 'wrong');
      expect(r.url).not.toContain('code=locked');
    }
    const fifth = await new HttpSession().signIn(user.email, 'wrong');
    expect(fifth.url).toContain('code=locked');
    const row = await db('users').where({ id: user.id }).first();
    const lockMinutes = (new Date(row.locked_until).getTime() - Date.now()) / 60_000;
    expect(lockMinutes).toBeGreaterThan(14);
    expect(lockMinutes).toBeLessThanOrEqual(15);

    const rightButLocked = await new HttpSession().signIn(user.email, user.password);
    expect(rightButLocked.ok).toBe(false);
    expect(rightButLocked.url).toContain('code=locked');

    const admin = await signedIn('admin@harbourside.example');
    const unlock = await admin.post(`/api/admin/users/${user.id}/unlock`);
    expect(unlock.status).toBe(200);
    expect((await new HttpSession().signIn(user.email, user.password)).ok).toBe(true);
    const audit = await db('audit_log').where({ entity: 'user', entity_id: String(user.id), action: 'user.unlock' });
    expect(audit).toHaveLength(1);
  });

  it('a success resets the count: four wrong, one right, four wrong does not lock', async () => {
    const user = await createUser(db, { role: 'outreach' });
    for (let i = 0; i < 4; i++) await new HttpSession().signIn(user.email, 'wrong');
    expect((await new HttpSession().signIn(user.email, user.password)).ok).toBe(true);
    for (let i = 0; i < 4; i++) await new HttpSession().signIn(user.email, 'wrong');
    expect((await new HttpSession().signIn(user.email, user.password)).ok).toBe(true);
  });

  it('refuses a deactivated account, and ends its existing session', async () => {
    const user = await createUser(db, { role: 'intensivist' });
    const session = await signedIn(user.email, user.password);
    expect((await session.get('/api/me')).status).toBe(200);
    await db('users').where({ id: user.id }).update({ active: false });
    expect((await session.get('/api/me')).status).toBe(401);
    expect((await new HttpSession().signIn(user.email, user.password)).ok).toBe(false);
  });
});

describe('roles on the server', () => {
  it('answers 401 in the one error shape when signed out', async () => {
    const res = await new HttpSession().get('/api/me');
    expect(res.status).toBe(401);
    expect(await res.json()).toEqual({ error: { code: 'unauthenticated', message: expect.any(String) } });
  });

  it('answers 403 to a non-admin on admin APIs and 200 to the admin', async () => {
    for (const role of ['nurse', 'charge', 'intensivist', 'outreach']) {
      const session = await signedIn(`${role}@harbourside.example`);
      const res = await session.get('/api/admin/users');
      expect(res.status, role).toBe(403);
      expect((await res.json()).error.code).toBe('forbidden');
      expect((await session.post('/api/admin/users/1/unlock')).status, role).toBe(403);
    }
    const admin = await signedIn('admin@harbourside.example');
    const res = await admin.get('/api/admin/users');
    expect(res.status).toBe(200);
    expect((await res.json()).users.length).toBeGreaterThanOrEqual(5);
  });

  it('redirects signed-out page visits to sign-in and answers 403 to the wrong role', async () => {
    const anon = await new HttpSession().get('/admin/users');
    expect(anon.status).toBe(302);
    expect(anon.headers.get('location')).toContain('/signin?callbackUrl=%2Fadmin%2Fusers');
    const nurse = await signedIn('nurse@harbourside.example');
    expect((await nurse.get('/admin/users')).status).toBe(403);
  });

  it('refuses a state-changing API call from another origin', async () => {
    const admin = await signedIn('admin@harbourside.example');
    const res = await admin.request('/api/admin/users/1/unlock', {
      method: 'POST',
      headers: { origin: 'http://evil.example' },
      json: {},
    });
    expect(res.status).toBe(403);
  });

  it('answers 400 with the field named for a bad id', async () => {
    const admin = await signedIn('admin@harbourside.example');
    const res = await admin.post('/api/admin/users/abc/unlock');
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.error.code).toBe('invalid_input');
    expect(body.error.fields).toHaveProperty('id');
  });
});
