import { describe, expect, it } from 'vitest';
import { HttpSession, signedIn } from '../support/app.ts';
import { waitForMail } from '../support/mailbox.ts';
import { countRows, createUser, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s, ids } = useWard({
  beds: 2,
  people: {
    admin: ['admin', null],
    admin2: ['admin', null],
    nurse: ['nurse', 'unit'],
    charge: ['charge', 'unit'],
    intensivist: ['intensivist', null],
  },
});
const GOOD = 'tidal harbour lantern quietly';

// mysql2 hands JSON columns back parsed.
const asJson = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);
const patch = (who: HttpSession, path: string, json: unknown) => who.request(path, { method: 'PATCH', json });
const newEmail = () => `${unique('staff')}@fixture.example`;

/** The token from the set-password mail the SMTP fake received for `email`. */
async function linkTokenFor(email: string, count = 1): Promise<string> {
  const mails = await waitForMail((m) => m.to.includes(email), 20_000);
  expect(mails.length).toBeGreaterThanOrEqual(count);
  const newest = mails.sort((a, b) => b.id - a.id)[0];
  const token = newest.text.match(/set-password\?token=([A-Za-z0-9_-]+)/)?.[1];
  expect(token, newest.text).toBeTruthy();
  return token!;
}

async function createNurse(email = newEmail()) {
  const res = await s.admin.post('/api/admin/users', { name: 'Nia Okafor', email, role: 'nurse', unitCode: unit.code });
  expect(res.status, await res.clone().text()).toBe(201);
  return { email, id: (await res.json()).user.id as number };
}

describe('staff accounts: who may manage them', () => {
  it('lets only administrators list, create and change accounts', async () => {
    expect((await s.anon.get('/api/admin/users')).status).toBe(401);
    expect((await s.nurse.get('/api/admin/users')).status).toBe(403);
    expect((await s.admin.get('/api/admin/users')).status).toBe(200);
    const body = { name: 'No One', email: newEmail(), role: 'nurse', unitCode: unit.code };
    expect((await s.anon.post('/api/admin/users', body)).status).toBe(401);
    for (const who of ['nurse', 'charge', 'intensivist']) {
      expect((await s[who].post('/api/admin/users', body)).status, who).toBe(403);
      expect((await patch(s[who], `/api/admin/users/${ids.nurse}`, { role: 'charge' })).status, who).toBe(403);
      for (const action of ['deactivate', 'reactivate', 'send-link'])
        expect((await s[who].post(`/api/admin/users/${ids.nurse}/${action}`, {})).status, `${who} ${action}`).toBe(403);
    }
    expect(await db('users').where({ email: body.email }).first()).toBeUndefined();
  });
});

describe('creating a person', () => {
  it('refuses a nurse without a unit (400 naming unitCode), an unknown unit, a bad e-mail; stores nothing', async () => {
    const before = await countRows(db, 'users');
    const outbox = await countRows(db, 'mail_outbox');
    let res = await s.admin.post('/api/admin/users', { name: 'Nia Okafor', email: newEmail(), role: 'nurse' });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields).toEqual({ unitCode: expect.stringMatching(/needs a unit/) });
    res = await s.admin.post('/api/admin/users', {
      name: 'Nia Okafor',
      email: newEmail(),
      role: 'intensivist',
      unitCode: unit.code,
    });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.unitCode).toMatch(/across units/);
    res = await s.admin.post('/api/admin/users', {
      name: 'Nia Okafor',
      email: newEmail(),
      role: 'nurse',
      unitCode: 'NOPE99',
    });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.unitCode).toMatch(/No unit/);
    res = await s.admin.post('/api/admin/users', { name: 'N', email: 'not-an-email', role: 'matron' });
    expect(res.status).toBe(400);
    expect(Object.keys((await res.json()).error.fields).sort()).toEqual(['email', 'name', 'role']);
    expect(await countRows(db, 'users')).toBe(before);
    expect(await countRows(db, 'mail_outbox')).toBe(outbox);
  });

  it('refuses a duplicate e-mail with 409, whatever its case', async () => {
    const res = await s.admin.post('/api/admin/users', {
      name: 'Copy Cat',
      email: 'NURSE@harbourside.example',
      role: 'nurse',
      unitCode: unit.code,
    });
    expect(res.status).toBe(409);
    const { error } = await res.json();
    expect(error.code).toBe('duplicate_email');
    expect(error.fields.email).toBeTruthy();
  });

  it('makes the account, queues a set-password mail, stores only the hash of the link, and audits', async () => {
    const { email, id } = await createNurse();
    const row = await db('users').where({ id }).first();
    expect(row).toMatchObject({ email, role: 'nurse', unit_id: unit.unitId, must_change_password: 1, active: 1 });
    const token = await linkTokenFor(email);
    const link = await db('password_links').where({ user_id: id }).first();
    expect(link.token_hash).toHaveLength(64);
    expect(link.token_hash).not.toContain(token);
    expect(new Date(link.expires_at).getTime() - new Date(link.created_at).getTime()).toBe(24 * 3_600_000);
    const actions = (
      await db('audit_log')
        .where({ entity: 'user', entity_id: String(id) })
        .select('action', 'actor_id')
    )
      .map((r) => r.action)
      .sort();
    expect(actions).toEqual(['user.create', 'user.password_link']);
    // Once sent, the outbox row keeps the mail but not the token; the admin Mail page never shows it.
    let sent: { status: string; text_body: string; html_body: string } | undefined;
    for (let i = 0; i < 100 && !sent; i++) {
      const o = await db('mail_outbox').where({ to_addresses: email }).first();
      if (o.status === 'sent') sent = o;
      else await new Promise((r) => setTimeout(r, 200));
    }
    expect(sent?.status).toBe('sent');
    expect(sent!.text_body).not.toContain(token);
    expect(sent!.html_body).not.toContain(token);
    expect(sent!.text_body).toContain('token=(removed after sending)');
    expect(JSON.stringify(await (await s.admin.get('/api/admin/mail')).json())).not.toContain(token);
  });
});

describe('set-password links', () => {
  it('set a password once: a common one is refused and changes nothing; a good one works; the link then says used', async () => {
    const { email, id } = await createNurse();
    const token = await linkTokenFor(email);
    const anon = new HttpSession();
    const page = await anon.get(`/set-password?token=${token}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain(email);
    const hashBefore = (await db('users').where({ id }).first()).password_hash;

    let res = await anon.post('/api/account/password-link', { token, password: 'qwerty123456' });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.password).toMatch(/commonly used/);
    res = await anon.post('/api/account/password-link', { token, password: 'short one' });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.password).toMatch(/12 characters/);
    expect((await db('users').where({ id }).first()).password_hash).toBe(hashBefore);
    expect((await db('password_links').where({ user_id: id }).first()).used_at).toBeNull();

    res = await anon.post('/api/account/password-link', { token, password: GOOD });
    expect(res.status, await res.clone().text()).toBe(200);
    const after = await db('users').where({ id }).first();
    expect(after.must_change_password).toBe(0);
    expect(after.password_hash).not.toBe(hashBefore);

    res = await anon.post('/api/account/password-link', { token, password: `${GOOD} again` });
    expect(res.status).toBe(410);
    expect((await res.json()).error.code).toBe('link_used');
    const used = await anon.get(`/set-password?token=${token}`);
    expect(used.status).toBe(410);
    expect(await used.text()).toContain('already been used');

    const nurse = await signedIn(email, GOOD);
    expect((await nurse.get('/api/me')).status).toBe(200);
    expect((await nurse.get(`/api/board?unit=${unit.code}`)).status).toBe(200);
  });

  it('refuses unknown and expired links with a clear page, changing nothing', async () => {
    const anon = new HttpSession();
    const unknown = await anon.get('/set-password?token=abcdefghijklmnopqrstuvwxyz012345');
    expect(unknown.status).toBe(404);
    expect(await unknown.text()).toContain('not one Ebbwatch sent');
    let res = await anon.post('/api/account/password-link', {
      token: 'abcdefghijklmnopqrstuvwxyz012345',
      password: GOOD,
    });
    expect(res.status).toBe(404);
    expect((await res.json()).error.code).toBe('link_unknown');

    const { email, id } = await createNurse();
    const token = await linkTokenFor(email);
    await db('password_links')
      .where({ user_id: id })
      .update({ expires_at: new Date(Date.now() - 1000) });
    const hashBefore = (await db('users').where({ id }).first()).password_hash;
    const page = await anon.get(`/set-password?token=${token}`);
    expect(page.status).toBe(410);
    expect(await page.text()).toContain('expired');
    res = await anon.post('/api/account/password-link', { token, password: GOOD });
    expect(res.status).toBe(410);
    expect((await res.json()).error.code).toBe('link_expired');
    expect((await db('users').where({ id }).first()).password_hash).toBe(hashBefore);
  });

  it('an admin reset sends a new link, ends the older one, and forces a change at the next sign-in', async () => {
    const email = newEmail();
    const u = await createUser(db, { role: 'nurse', unitId: unit.unitId, email, password: 'fixture-password' });
    const nurse = await signedIn(email, 'fixture-password');
    let res = await s.admin.post(`/api/admin/users/${u.id}/send-link`, {});
    expect(res.status).toBe(200);
    const first = await linkTokenFor(email);
    res = await s.admin.post(`/api/admin/users/${u.id}/send-link`, {});
    const mails = await waitForMail((m) => m.to.includes(email) && !m.text.includes(first), 20_000);
    const second = mails[0].text.match(/token=([A-Za-z0-9_-]+)/)![1];
    expect((await new HttpSession().post('/api/account/password-link', { token: first, password: GOOD })).status).toBe(
      410,
    );

    // Signed in with the old password: everything but My account waits for a new one.
    const board = await nurse.get(`/api/board?unit=${unit.code}`);
    expect(board.status).toBe(403);
    expect((await board.json()).error.code).toBe('password_change_required');
    const home = await nurse.get('/');
    expect(home.status).toBe(302);
    expect(home.headers.get('location')).toBe('/account?required=1');
    expect((await nurse.get('/account')).status).toBe(200);
    expect((await nurse.get('/api/me')).status).toBe(200);
    res = await nurse.post('/api/account/password', { currentPassword: 'fixture-password', newPassword: GOOD });
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await nurse.get(`/api/board?unit=${unit.code}`)).status).toBe(200);
    // The unused second link died with the change.
    expect(
      (await new HttpSession().post('/api/account/password-link', { token: second, password: `${GOOD} two` })).status,
    ).toBe(410);
  });

  it('refuses a link for a deactivated account', async () => {
    const { email, id } = await createNurse();
    const token = await linkTokenFor(email);
    expect((await s.admin.post(`/api/admin/users/${id}/deactivate`, {})).status).toBe(200);
    expect((await new HttpSession().post('/api/account/password-link', { token, password: GOOD })).status).toBe(410);
    expect((await s.admin.post(`/api/admin/users/${id}/send-link`, {})).status).toBe(409);
  });
});

describe('own password', () => {
  it('needs the current password, applies the rules, and then only the new one signs in', async () => {
    const email = newEmail();
    await createUser(db, { role: 'charge', unitId: unit.unitId, email, password: 'fixture-password' });
    const me = await signedIn(email, 'fixture-password');
    expect(
      (await new HttpSession().post('/api/account/password', { currentPassword: 'x', newPassword: GOOD })).status,
    ).toBe(401);
    let res = await me.post('/api/account/password', { currentPassword: 'wrong-password', newPassword: GOOD });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.currentPassword).toBeTruthy();
    res = await me.post('/api/account/password', { currentPassword: 'fixture-password', newPassword: 'password1234' });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.newPassword).toMatch(/commonly used/);
    res = await me.post('/api/account/password', { currentPassword: 'fixture-password', newPassword: 'elevenchars' });
    expect((await res.json()).error.fields.newPassword).toMatch(/12/);
    res = await me.post('/api/account/password', { currentPassword: 'fixture-password', newPassword: GOOD });
    expect(res.status).toBe(200);
    expect((await new HttpSession().signIn(email, 'fixture-password')).ok).toBe(false);
    expect((await new HttpSession().signIn(email, GOOD)).ok).toBe(true);
    expect(
      await db('audit_log')
        .where({ action: 'user.password_change', actor_id: (await db('users').where({ email }).first()).id })
        .first(),
    ).toBeTruthy();
  });
});

describe('changing role or unit, deactivating, reactivating', () => {
  it('changes role and unit within the unit rules; 400 names unitCode when the rule is broken', async () => {
    const email = newEmail();
    const u = await createUser(db, { role: 'nurse', unitId: unit.unitId, email });
    let res = await patch(s.admin, `/api/admin/users/${u.id}`, { role: 'charge' });
    expect(res.status).toBe(200);
    expect((await db('users').where({ id: u.id }).first()).role).toBe('charge');
    res = await patch(s.admin, `/api/admin/users/${u.id}`, { role: 'intensivist' });
    expect(res.status).toBe(200);
    expect(await db('users').where({ id: u.id }).first()).toMatchObject({ role: 'intensivist', unit_id: null });
    res = await patch(s.admin, `/api/admin/users/${u.id}`, { role: 'nurse' });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields).toEqual({ unitCode: expect.stringMatching(/needs a unit/) });
    expect((await db('users').where({ id: u.id }).first()).role).toBe('intensivist');
    res = await patch(s.admin, `/api/admin/users/${u.id}`, { role: 'outreach', unitCode: unit.code });
    expect(res.status).toBe(400);
    res = await patch(s.admin, `/api/admin/users/${u.id}`, {});
    expect(res.status).toBe(400);
    res = await patch(s.admin, '/api/admin/users/99999999', { name: 'Nobody Here' });
    expect(res.status).toBe(404);
    const audit = await db('audit_log')
      .where({ action: 'user.update', entity_id: String(u.id) })
      .orderBy('id')
      .select('before', 'after');
    expect(audit).toHaveLength(2);
    expect(asJson(audit[1].before)).toMatchObject({ role: 'charge' });
    expect(asJson(audit[1].after)).toMatchObject({ role: 'intensivist', unitCode: null });
  });

  it('deactivation ends an open session at its next request; reactivation lets her sign in again (the old session stays ended)', async () => {
    const email = newEmail();
    const u = await createUser(db, { role: 'nurse', unitId: unit.unitId, email });
    const nurse = await signedIn(email, 'fixture-password');
    expect((await nurse.get('/api/me')).status).toBe(200);
    expect((await s.admin.post(`/api/admin/users/${u.id}/deactivate`, { reason: 'left the trust' })).status).toBe(200);
    expect((await nurse.get('/api/me')).status).toBe(401);
    expect((await nurse.get('/board')).status).toBe(302);
    expect((await new HttpSession().signIn(email, 'fixture-password')).ok).toBe(false);
    expect((await s.admin.post(`/api/admin/users/${u.id}/reactivate`, {})).status).toBe(200);
    // Deactivation revoked the session record behind her cookie (issue 12): it does not come back.
    expect((await nurse.get('/api/me')).status).toBe(401);
    const again = new HttpSession();
    expect((await again.signIn(email, 'fixture-password')).ok).toBe(true);
    expect((await again.get('/api/me')).status).toBe(200);
    const actions = (
      await db('audit_log')
        .where({ entity: 'user', entity_id: String(u.id) })
        .orderBy('id')
        .select('action')
    ).map((r) => r.action);
    expect(actions.filter((a: string) => a.startsWith('user.'))).toEqual(['user.deactivate', 'user.reactivate']); // sign-ins are audited too
  });

  it('refuses to deactivate or demote the last active administrator (409), and two admins cannot remove each other at once', async () => {
    const others = (
      await db('users').where({ role: 'admin', active: true }).whereNotIn('id', [ids.admin, ids.admin2]).select('id')
    ).map((r) => r.id);
    await db('users').whereIn('id', others).update({ active: false });
    try {
      // Two active admins deactivate each other at the same moment: the row locks let exactly one through.
      const [a, b] = await Promise.all([
        s.admin.post(`/api/admin/users/${ids.admin2}/deactivate`, {}),
        s.admin2.post(`/api/admin/users/${ids.admin}/deactivate`, {}),
      ]);
      // The loser is refused either by the lock (409 last_admin) or, when it arrives after the
      // winner committed, by the per-request user lookup (401): never both deactivated.
      expect([a.status, b.status].filter((x) => x === 200)).toHaveLength(1);
      expect([409, 401]).toContain(a.status === 200 ? b.status : a.status);
      expect(
        await db('users').whereIn('id', [ids.admin, ids.admin2]).where({ active: true }).count({ n: '*' }),
      ).toEqual([{ n: 1 }]);
      const survivor = a.status === 200 ? s.admin : s.admin2;
      const survivorId = a.status === 200 ? ids.admin : ids.admin2;
      const res = await survivor.post(`/api/admin/users/${survivorId}/deactivate`, {});
      expect(res.status).toBe(409);
      expect((await res.json()).error.code).toBe('last_admin');
      expect((await patch(survivor, `/api/admin/users/${survivorId}`, { role: 'outreach' })).status).toBe(409);
      expect(await db('users').where({ role: 'admin', active: true }).count({ n: '*' })).toEqual([{ n: 1 }]);
      await survivor.post(`/api/admin/users/${survivorId === ids.admin ? ids.admin2 : ids.admin}/reactivate`, {});
    } finally {
      await db('users')
        .whereIn('id', [...others, ids.admin, ids.admin2])
        .update({ active: true });
    }
  });
});
