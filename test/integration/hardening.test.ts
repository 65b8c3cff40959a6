/**
 * Issue 12: each door the probe found, shut and kept shut. Every test here failed before its fix.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { APP_URL, HttpSession, signedIn } from '../support/app.ts';
import { countRows, createAdmittedPatient, createUser, unique } from '../support/db.ts';
import { expectEachRefused, type RefusalCase } from '../support/refusals.ts';
import { useWard } from '../support/ward.ts';
import { signOut } from '../support/signout.ts';
import { ADDRESS_FAILURES, ACCOUNT_FAILURES } from '../../src/lib/auth/throttle.ts';
import { revokeSessionsOf } from '../../src/lib/server/queries/sessions.ts';
import { closeDb } from '../../src/lib/server/queries/db.ts';

const { db, unit, s } = useWard({
  beds: 10,
  people: { charge: ['charge', 'unit'], charge2: ['charge', 'unit'], nurse: ['nurse', 'unit'] },
});
afterAll(async () => {
  await closeDb();
});

/** A caller at its own address (the test app trusts X-Forwarded-For, as behind a load balancer). */
function from(address: string, session = new HttpSession()) {
  const original = session.request.bind(session);
  session.request = (path, init = {}) =>
    original(path, {
      ...init,
      headers: { ...Object.fromEntries(new Headers(init.headers)), 'x-forwarded-for': address },
    });
  return session;
}
let addressCounter = 0;
// Unique within a run (the counter) and across reruns on one database (the run stamp): an address
// that collided with one an earlier test had throttled made the per-account test flaky.
const RUN_STAMP = (Date.now() % 0xffff).toString(16);
const freshAddress = () => `2001:db8::${RUN_STAMP}:${(++addressCounter).toString(16)}`;

describe('1. redirects stay on this site', () => {
  it('sign-in with a callbackUrl of /\\evil.example or /<TAB>/evil.example, while signed in, goes to /', async () => {
    for (const cb of ['/%5Cevil.example', '/%09/evil.example', '//evil.example', 'https://evil.example/']) {
      const res = await s.nurse.get(`/signin?callbackUrl=${cb}`);
      expect(res.status, cb).toBe(302);
      expect(res.headers.get('location'), cb).toBe('/');
    }
    const ok = await s.nurse.get('/signin?callbackUrl=%2Fboard');
    expect(ok.headers.get('location')).toBe('/board');
  });

  it('the theme toggle does the same', async () => {
    for (const back of ['/\\evil.example', '/\t/evil.example', '//evil.example']) {
      const res = await new HttpSession().request('/api/theme', {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams({ back }).toString(),
      });
      expect(res.status, back).toBe(303);
      expect(res.headers.get('location'), back).toBe('/');
    }
  });
});

describe('2. security headers on every response', () => {
  const expectCommon = (res: Response, what: string) => {
    expect(res.headers.get('x-content-type-options'), what).toBe('nosniff');
    expect(res.headers.get('x-frame-options'), what).toBe('DENY');
    expect(res.headers.get('referrer-policy'), what).toBe('same-origin');
    expect(res.headers.get('permissions-policy'), what).toMatch(/camera=\(\)/);
    expect(res.headers.get('content-security-policy'), what).toMatch(/frame-ancestors 'none'/);
  };

  it('pages: a CSP allowing only our own scripts and styles, no caching of patient data', async () => {
    for (const path of ['/board', '/patients', '/signin', '/forbidden']) {
      const res = await (path === '/signin' ? new HttpSession() : s.charge).get(path);
      expectCommon(res, path);
      expect(res.headers.get('cache-control'), path).toBe('no-store');
      const meta = res.headers.get('content-security-policy');
      expect(meta, `${path} carries Astro's CSP`).toMatch(/script-src/);
      const script = /script-src ([^;]+)/.exec(meta!)![1];
      expect(script).toMatch(/'self'/);
      expect(script).not.toMatch(/unsafe-inline|unsafe-eval|\*|https?:/);
      const style = /style-src ([^;]+)/.exec(meta!)![1];
      expect(style).not.toMatch(/\*|https?:/);
      expect(meta).toMatch(/default-src 'self'/);
    }
  });

  it('API answers, errors, redirects and the health check carry them too', async () => {
    for (const [res, what] of [
      [await s.charge.get('/api/me'), 'api'],
      [await new HttpSession().get('/api/me'), '401'],
      [await new HttpSession().get('/api/health'), 'health'],
      [await new HttpSession().get('/board'), 'redirect'],
      [await s.charge.get('/no-such-page'), '404 page'],
    ] as const) {
      expectCommon(res, what);
    }
    const api = await s.charge.get('/api/me');
    expect(api.headers.get('content-security-policy')).toMatch(/default-src 'none'/);
  });

  it('the app works under its CSP: the sign-in page has no inline script without a hash', async () => {
    const res = await new HttpSession().get('/signin');
    const meta = res.headers.get('content-security-policy')!;
    const html = await res.text();
    const hashes = new Set([...meta.matchAll(/'(sha(?:256|384|512)-[^']+)'/g)].map((m) => m[1]));
    const { createHash } = await import('node:crypto');
    for (const m of html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)) {
      if (!m[1].trim()) continue;
      const algo = [...hashes][0]?.split('-')[0] ?? 'sha256';
      const digest = `${algo}-${createHash(algo).update(m[1]).digest('base64')}`;
      expect(hashes.has(digest), `inline script ${m[1].slice(0, 40)}…`).toBe(true);
    }
  });
});

describe('3. races end in 409, not 500', () => {
  it('two admissions of one new MRN at once: one 201, one 409 already_admitted', async () => {
    const mrn = unique('RACE').toUpperCase().slice(0, 20);
    const body = (bed: number) => ({
      givenName: 'Rhea',
      familyName: 'Race',
      mrn,
      dateOfBirth: '1970-03-03',
      bedId: unit.bedIds[bed],
    });
    const [a, b] = await Promise.all([
      s.charge.post('/api/patients', body(0)),
      s.charge2.post('/api/patients', body(1)),
    ]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    const loser = a.status === 409 ? a : b;
    expect((await loser.json()).error.code).toBe('already_admitted');
    expect(await db('patients').where({ mrn }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  it('two moves into one free bed at once: one 200, one 409 bed_occupied', async () => {
    const admitted = [];
    for (const bed of [2, 3]) {
      const res = await s.charge.post('/api/patients', {
        givenName: 'Mo',
        familyName: unique('Ve'),
        mrn: unique('MV').toUpperCase().slice(0, 20),
        dateOfBirth: '1980-01-01',
        bedId: unit.bedIds[bed],
      });
      expect(res.status).toBe(201);
      admitted.push((await res.json()).patient.id);
    }
    const target = unit.bedIds[4];
    const [a, b] = await Promise.all([
      s.charge.post(`/api/patients/${admitted[0]}/move`, { bedId: target }),
      s.charge2.post(`/api/patients/${admitted[1]}/move`, { bedId: target }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const loser = a.status === 409 ? a : b;
    expect((await loser.json()).error.code).toBe('bed_occupied');
    expect(await db('bed_stays').where({ bed_id: target }).whereNull('ended_at').count({ n: '*' }).first()).toEqual({
      n: 1,
    });
  });

  it('a pleth strip sampled at 100 kHz is refused alike by analyse and attach (400, nothing stored)', async () => {
    const rows = ['time,red,infrared,dark'];
    for (let i = 0; i < 400; i++) rows.push(`${(i / 100_000).toFixed(5)},${1000 + (i % 7)},${1200 + (i % 5)},10`);
    const csv = rows.join('\n');
    const analyse = await s.nurse.request('/api/pleth/analyse', {
      method: 'POST',
      headers: { 'content-type': 'text/csv' },
      body: csv,
    });
    expect(analyse.status).toBe(400);
    const { patientId } = await createAdmittedPatient(db, { bedId: unit.bedIds[5], since: Date.now() - 3_600_000 });
    const before = await countRows(db, 'pleth_checks');
    const attach = await s.nurse.post('/api/pleth/checks', { patientId, fileName: 'fast.csv', csv });
    expect(attach.status).toBe(400);
    expect(JSON.stringify((await attach.json()).error)).toMatch(/10000 Hz/);
    expect(await countRows(db, 'pleth_checks')).toBe(before);
  });
});

describe('4. refused instead of stored', () => {
  let patientId: number;
  beforeAll(async () => {
    ({ patientId } = await createAdmittedPatient(db, { bedId: unit.bedIds[6], since: Date.now() - 60 * 60_000 }));
  });
  const obs = (extra: Record<string, unknown> = {}) => ({
    takenAt: new Date(Date.now() - 60_000).toISOString(),
    spo2: 95,
    heartRate: 80,
    device: 'room_air',
    trace: 'clean',
    ...extra,
  });

  it('an obs timed before the patient came to this bed', async () => {
    const before = await countRows(db, 'observations');
    const res = await s.nurse.post(
      `/api/patients/${patientId}/observations`,
      obs({ takenAt: new Date(Date.now() - 3 * 3_600_000).toISOString() }),
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.takenAt).toMatch(/before the patient came to this bed/);
    expect(await countRows(db, 'observations')).toBe(before);
  });

  it('unknown fields, numbers as strings, arrays or hex, booleans: refused with the field named', async () => {
    const cases: RefusalCase[] = [
      [{ heartRate: undefined, heartrate: 80 }, 'heartrate', /not a field/],
      [{ spo2: '0x5F' }, 'spo2', /SpO₂ must be a number/],
      [{ spo2: [95] }, 'spo2', /SpO₂ must be a number/],
      [{ spo2: '95' }, 'spo2', /SpO₂ must be a number/],
      [{ spo2: true }, 'spo2', /SpO₂ must be a number/],
      [{ fio2: 1.01, device: 'simple_mask' }, 'fio2', /cannot be over 100 % \(1\.0\)/],
      [{ takenAt: '2026-11-31T12:00:00Z' }, 'takenAt', /real calendar day/],
    ];
    await expectEachRefused(db, 'observations', cases, (patch) =>
      s.nurse.post(`/api/patients/${patientId}/observations`, obs(patch)),
    );
  });

  it('/api/patients/0x10 is not patient 16', async () => {
    for (const id of ['0x10', '1e1', '+16', '16abc']) {
      const res = await s.charge.get(`/api/patients/${id}`);
      expect(res.status, id).toBe(400);
      expect((await res.json()).error.fields.id, id).toBeTruthy();
    }
  });

  it('an ingest time of 31 November is refused, not read as 1 December', async () => {
    const admin = await signedIn('admin@harbourside.example');
    const made = await admin.post('/api/admin/device-keys', { bedId: unit.bedIds[6], label: unique('k') });
    expect(made.status).toBe(201);
    const { key: deviceKey } = await made.json();
    const before = await countRows(db, 'observations');
    const res = await fetch(`${APP_URL}/api/ingest`, {
      method: 'POST',
      headers: { authorization: `Bearer ${deviceKey}`, 'content-type': 'application/json' },
      body: JSON.stringify({ readings: [{ at: '2026-11-31T12:00:00Z', spo2: 95 }] }),
    });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields['readings.0.at']).toMatch(/real date/);
    expect(await countRows(db, 'observations')).toBe(before);
  });

  it('9. re-admission compares names in Unicode NFC (a decomposed é is the same name)', async () => {
    const mrn = unique('NFC').toUpperCase().slice(0, 20);
    const composed = 'Zoé';
    const first = await s.charge.post('/api/patients', {
      givenName: composed,
      familyName: 'Ng',
      mrn,
      dateOfBirth: '1990-01-01',
      bedId: await freeBed(),
    });
    expect(first.status, await first.clone().text()).toBe(201);
    const pid = (await first.json()).patient.id;
    expect((await s.charge.post(`/api/patients/${pid}/discharge`, {})).status).toBe(200);
    const again = await s.charge.post('/api/patients', {
      givenName: 'Zoe\u0301',
      familyName: 'Ng',
      mrn,
      dateOfBirth: '1990-01-01',
      bedId: await freeBed(),
    });
    expect(again.status, await again.clone().text()).toBe(201);
    expect((await db('patients').where({ mrn }).first()).given_name).toBe(composed.normalize('NFC'));
  });

  async function freeBed(): Promise<number> {
    const occupied = new Set(
      await db('bed_stays').whereIn('bed_id', unit.bedIds).whereNull('ended_at').pluck('bed_id'),
    );
    const free = unit.bedIds.find((b) => !occupied.has(b));
    if (free === undefined) throw new Error('no free fixture bed');
    return free;
  }
});

describe('5. sign-in throttling per address and per account, counted in MariaDB', () => {
  it(`after ${ADDRESS_FAILURES} failures from one address: 429 with Retry-After, even for a right password; other addresses unaffected`, async () => {
    const address = freshAddress();
    const user = await createUser(db, { role: 'nurse', unitId: unit.unitId });
    for (let i = 0; i < ADDRESS_FAILURES; i++) {
      const r = await from(address).signIn(`${unique('nobody')}@fixture.example`, 'wrong');
      expect(r.ok).toBe(false);
    }
    const session = from(address);
    const { csrfToken } = await (await session.get('/api/auth/csrf')).json();
    const res = await session.request('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-auth-return-redirect': '1' },
      body: new URLSearchParams({ csrfToken, email: user.email, password: user.password, callbackUrl: '/' }).toString(),
    });
    expect(res.status).toBe(429);
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
    const body = await res.json();
    expect(body.error.code).toBe('too_many_signins');
    expect(body.url).toMatch(/^\/signin\?code=throttled/);
    expect(session.hasSession()).toBe(false);
    // The counters are rows in MariaDB, so every app instance sees them.
    expect(await db('rate_limits').where('key', 'like', `%${address}`).first()).toBeTruthy();
    expect((await from(freshAddress()).signIn(user.email, user.password)).ok).toBe(true);
  }, 180_000); // 40 password checks (bcrypt) on a shared 2-core machine

  it(`after ${ACCOUNT_FAILURES} failures for one account from many addresses: 429 for that account; the lockout rule still applies first`, async () => {
    const user = await createUser(db, { role: 'nurse', unitId: unit.unitId });
    for (let i = 0; i < ACCOUNT_FAILURES; i++) {
      const r = await from(freshAddress()).signIn(user.email, 'wrong');
      expect(r.ok).toBe(false);
      if (i === 4) expect(r.url).toContain('code=locked'); // five in a row still lock the account
    }
    await db('users').where({ id: user.id }).update({ failed_signins: 0, locked_until: null }); // even unlocked…
    const session = from(freshAddress());
    const { csrfToken } = await (await session.get('/api/auth/csrf')).json();
    const res = await session.request('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-auth-return-redirect': '1' },
      body: new URLSearchParams({ csrfToken, email: user.email, password: user.password, callbackUrl: '/' }).toString(),
    });
    expect(res.status).toBe(429); // …the account waits out its window
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
  });
});

describe('6. sessions end: a server-side record behind the cookie', () => {
  it('sign-out ends the session: the old cookie no longer reads /api/me or a patient page; audited with the address', async () => {
    const address = freshAddress();
    const user = await createUser(db, { role: 'charge', unitId: unit.unitId });
    const session = from(address);
    expect((await session.signIn(user.email, user.password)).ok).toBe(true);
    const cookie = session.cookieHeader();
    expect((await session.get('/api/me')).status).toBe(200);
    await signOut(session);
    // Replay the cookie from before the sign-out, as a thief who copied it would.
    const replay = await fetch(`${APP_URL}/api/me`, { headers: { cookie } });
    expect(replay.status).toBe(401);
    const page = await fetch(`${APP_URL}/patients`, { headers: { cookie }, redirect: 'manual' });
    expect(page.status).toBe(302);
    const rows = await db('sessions').where({ user_id: user.id });
    expect(rows).toHaveLength(1);
    expect(rows[0].revoked_reason).toBe('signout');
    const audit = await db('audit_log')
      .where({ entity: 'user', entity_id: String(user.id) })
      .orderBy('id')
      .pluck('action');
    expect(audit).toEqual(['signin.ok', 'signout']);
    const afters = (
      await db('audit_log')
        .where({ entity: 'user', entity_id: String(user.id) })
        .pluck('after')
    ).map((a) => (typeof a === 'string' ? JSON.parse(a) : a));
    expect(afters.every((a) => a.address === address)).toBe(true);
  });

  it('a failed sign-in is audited with the address', async () => {
    const address = freshAddress();
    const user = await createUser(db, { role: 'nurse', unitId: unit.unitId });
    await from(address).signIn(user.email, 'wrong');
    const row = await db('audit_log')
      .where({ entity: 'user', entity_id: String(user.id), action: 'signin.failed' })
      .first();
    const after = typeof row.after === 'string' ? JSON.parse(row.after) : row.after;
    expect(after).toMatchObject({ address, reason: 'wrong_password' });
  });

  it("revoking a user's sessions (deactivation, password change) ends every one of them at once", async () => {
    const user = await createUser(db, { role: 'nurse', unitId: unit.unitId });
    const a = await signedIn(user.email, user.password);
    const b = await signedIn(user.email, user.password);
    expect((await a.get('/api/me')).status).toBe(200);
    // As the staff pages call it on deactivation or a password change.
    expect(await revokeSessionsOf(user.id, 'password_changed')).toBe(2);
    expect((await a.get('/api/me')).status).toBe(401);
    expect((await b.get('/api/me')).status).toBe(401);
    expect((await signedIn(user.email, user.password).then((c) => c.get('/api/me'))).status).toBe(200);
  });
});

describe('7. cookie-authenticated writes need our Origin', () => {
  it('refuses a JSON write with no Origin, or with Sec-Fetch-Site: cross-site', async () => {
    const before = await countRows(db, 'bed_assignments');
    const noOrigin = await fetch(`${APP_URL}/api/beds/${unit.bedIds[0]}/assignment`, {
      method: 'PUT',
      headers: { cookie: s.charge.cookieHeader(), 'content-type': 'application/json' },
      body: JSON.stringify({ nurseId: null }),
    });
    expect(noOrigin.status).toBe(403);
    expect((await noOrigin.json()).error.code).toBe('cross_origin');
    const crossSite = await fetch(`${APP_URL}/api/beds/${unit.bedIds[0]}/assignment`, {
      method: 'PUT',
      headers: { cookie: s.charge.cookieHeader(), 'content-type': 'application/json', 'sec-fetch-site': 'cross-site' },
      body: JSON.stringify({ nurseId: null }),
    });
    expect(crossSite.status).toBe(403);
    expect(await countRows(db, 'bed_assignments')).toBe(before);
  });
});

describe('8. body caps: 413 before parsing', () => {
  it('a signed-out 1 MB form post to /api/theme and a large JSON body are refused with 413', async () => {
    const big = `back=${'a'.repeat(1024 * 1024)}`;
    const form = await new HttpSession().request('/api/theme', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: big,
    });
    expect(form.status).toBe(413);
    expect((await form.json()).error.code).toBe('body_too_large');
    const jsonRes = await s.charge.post('/api/patients', { givenName: 'x'.repeat(200 * 1024) });
    expect(jsonRes.status).toBe(413);
  });

  it('a body sent without a length (chunked) to a small-body route is refused with 411', async () => {
    const stream = new ReadableStream({
      start(c) {
        c.enqueue(new TextEncoder().encode('back=%2F'));
        c.close();
      },
    });
    const res = await fetch(`${APP_URL}/api/theme`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', origin: new URL(APP_URL).origin },
      body: stream,
      duplex: 'half',
    } as RequestInit);
    expect(res.status).toBe(411);
  });
});

describe('10. unknown /api/* paths answer in the JSON error shape', () => {
  it('404 JSON for a signed-in caller, 401 JSON for a signed-out one', async () => {
    const res = await s.charge.get('/api/no-such-route');
    expect(res.status).toBe(404);
    expect(res.headers.get('content-type')).toMatch(/json/);
    expect((await res.json()).error.code).toBe('not_found');
    const anon = await new HttpSession().get('/api/no-such-route');
    expect(anon.status).toBe(401);
    expect((await anon.json()).error.code).toBe('unauthenticated');
  });
});
