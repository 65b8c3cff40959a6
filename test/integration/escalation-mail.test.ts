/**
 * Issue 10 point 7: escalation e-mail that reads well on a phone and tells the time truthfully, with
 * the bedside nurse, the unit phone and a one-click claim link (signed, single use, expiring, hashed at rest).
 * Real MariaDB, the real app and the SMTP fake.
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HttpSession } from '../support/app.ts';
import { createAdmittedPatient, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';
import { waitForMail } from '../support/mailbox.ts';
import { renotifyUnclaimed } from '../../src/lib/server/escalations/sweep.ts';
import { deliverDueMail } from '../../src/lib/server/mail/outbox-worker.ts';
import { issueClaimLink } from '../../src/lib/server/escalations/claim-links.ts';
import { closeDb, db as appDb } from '../../src/lib/server/queries/db.ts';

const { db, unit, s, ids } = useWard({
  beds: 6,
  people: {
    nurse: ['nurse', 'unit'],
    outreach: ['outreach', null],
    admin: ['admin', null],
    intensivist: ['intensivist', null],
    charge: ['charge', 'unit'],
  },
});
const outreachAddress = `${unique('mailout')}@fixture.example`;
const nurseName = `Nia ${unique('Bedside')}`;
let bedCursor = 0;

beforeAll(async () => {
  await db('unit_settings').insert({
    unit_id: unit.unitId,
    outreach_emails: outreachAddress,
    unit_phone: '+44 20 7946 0123',
  });
  await db('users').where({ id: ids.nurse }).update({ name: nurseName });
  for (const bedId of unit.bedIds)
    await db('bed_assignments').insert({
      bed_id: bedId,
      nurse_id: ids.nurse,
      assigned_by: ids.charge,
      assigned_at: new Date(),
    });
});
afterAll(async () => {
  await closeDb();
});

async function admit() {
  const bedId = unit.bedIds[bedCursor++]!;
  return (
    await createAdmittedPatient(db, {
      bedId,
      since: Date.now() - 6 * 3_600_000,
      band: { low: 92, high: 96, orderedBy: ids.intensivist, orderedAt: Date.now() - 5 * 3_600_000 },
    })
  ).patientId;
}
async function chart(patientId: number, spo2: number, minsAgo: number, extra: Record<string, unknown> = {}) {
  const res = await s.nurse.post(`/api/patients/${patientId}/observations`, {
    takenAt: new Date(Date.now() - minsAgo * 60_000).toISOString(),
    spo2,
    heartRate: 100,
    respRate: 22,
    device: 'simple_mask',
    flowLpm: 6,
    fio2: 0.4,
    trace: 'clean',
    systolic: 118,
    consciousness: 'alert',
    ...extra,
  });
  expect(res.status, await res.clone().text()).toBe(201);
}
async function raised(patientId: number) {
  const esc = await db('escalations').where({ patient_id: patientId, kind: 'below_band' }).first();
  const [mail] = await waitForMail((m) => m.key === `esc:${esc.id}:raised`);
  return { esc, mail: mail! };
}
const tokenOf = (text: string) => decodeURIComponent(/\/escalations\/claim\?token=(\S+)/.exec(text)![1]!);

describe('escalation e-mail (issue 10 point 7)', () => {
  it('is phone-readable HTML with a plain part: readings with seconds, NEWS2 gaps, bedside nurse, unit phone, claim link', async () => {
    const p = await admit();
    await chart(p, 89, 20);
    await chart(p, 88, 1); // no temperature charted: NEWS2 names it
    const { mail } = await raised(p);
    expect(mail.html).toContain('<meta name="viewport" content="width=device-width, initial-scale=1">');
    expect(mail.html).not.toMatch(/<table/);
    expect(mail.text).toMatch(/^ {2}\d\d:\d\d:\d\d {2}SpO₂ 88 %/m); // readings carry seconds
    expect(mail.text).toContain('NEWS2: incomplete — missing temperature');
    expect(mail.text).toContain(`Bedside nurse: ${nurseName} · Unit phone: +44 20 7946 0123`);
    expect(mail.text).toMatch(
      /Claim it: http:\/\/127\.0\.0\.1:\d+\/escalations\/claim\?token=\S+ \(works once, until \d\d:\d\d, after sign-in\)/,
    );
  });

  it('the claim link: sign-in first, claims once, is stored only as a hash, and refuses altered or expired tokens', async () => {
    const p = await admit();
    await chart(p, 89, 20);
    await chart(p, 88, 1);
    const { esc, mail } = await raised(p);
    const token = tokenOf(mail.text);
    const path = `/escalations/claim?token=${encodeURIComponent(token)}`;

    // Hashed at rest: the table holds the SHA-256, never the token.
    const rows = await db('escalation_claim_tokens').where({ escalation_id: esc.id });
    expect(rows).toHaveLength(1);
    expect(rows[0].token_hash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(JSON.stringify(rows)).not.toContain(token.split('.')[2]);

    const anon = await new HttpSession().get(path);
    expect(anon.status).toBe(302);
    expect(anon.headers.get('location')).toBe(`/signin?callbackUrl=${encodeURIComponent(path)}`);
    expect((await db('escalations').where({ id: esc.id }).first()).state).toBe('raised');

    const admin = await s.admin.get(path); // not a clinical role: refused, token not spent
    expect(admin.status).toBe(403);
    expect((await db('escalation_claim_tokens').where({ escalation_id: esc.id }).first()).used_at).toBeNull();

    const altered = await s.outreach.get(
      `/escalations/claim?token=${encodeURIComponent(token.slice(0, -2) + (token.endsWith('AA') ? 'BB' : 'AA'))}`,
    );
    expect(altered.status).toBe(400);
    expect(await altered.text()).toContain('This claim link is not valid');

    const ok = await s.outreach.get(path);
    expect(ok.status).toBe(200);
    expect(await ok.text()).toContain('You have claimed this escalation.');
    const after = await db('escalations').where({ id: esc.id }).first();
    expect(after.state).toBe('claimed');
    const ev = await db('escalation_events').where({ escalation_id: esc.id, type: 'claimed' }).first();
    expect(typeof ev.detail === 'string' ? JSON.parse(ev.detail) : ev.detail).toEqual({ via: 'e-mail link' });
    expect((await db('escalation_claim_tokens').where({ escalation_id: esc.id }).first()).used_at).not.toBeNull();

    const again = await s.nurse.get(path);
    expect(again.status).toBe(409);
    expect(await again.text()).toContain('already been used');

    // Expired: a link made five hours ago (the default lifetime is four).
    const p2 = await admit();
    await chart(p2, 89, 20);
    await chart(p2, 88, 1);
    const { esc: esc2 } = await raised(p2);
    const old = await appDb().transaction((trx) => issueClaimLink(trx, esc2.id, new Date(Date.now() - 5 * 3_600_000)));
    const expired = await s.outreach.get(new URL(old.url).pathname + new URL(old.url).search);
    expect(expired.status).toBe(410);
    expect(await expired.text()).toContain('expired');
    expect((await db('escalations').where({ id: esc2.id }).first()).state).toBe('raised');
  });

  it('a reminder with no readings since the first notice says "no new readings since hh:mm"', async () => {
    const p = await admit();
    await chart(p, 89, 20);
    await chart(p, 88, 1);
    const { esc } = await raised(p);
    const later = new Date(Date.now() + 16 * 60_000);
    expect(await renotifyUnclaimed(later, unit.unitId)).toBeGreaterThanOrEqual(1);
    await deliverDueMail(later, { worker: 'test-clock' });
    const [reminder] = await waitForMail((m) => m.key === `esc:${esc.id}:renotify:1`);
    const newest = await db('observations').where({ patient_id: p }).max({ t: 'taken_at' }).first();
    const hhmm = new Intl.DateTimeFormat('en-GB', {
      timeZone: 'Europe/London',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    }).format(new Date(newest!.t));
    expect(reminder!.text).toContain(`No new readings since ${hhmm}.`);
  });
});
