import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HttpSession } from '../support/app.ts';
import { createAdmittedPatient, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';
import { received, smtp, waitForMail } from '../support/mailbox.ts';
import { startInstance } from '../support/instance.ts';
import { renotifyUnclaimed } from '../../src/lib/server/escalations/sweep.ts';
import { deliverDueMail } from '../../src/lib/server/mail/outbox-worker.ts';
import { closeDb } from '../../src/lib/server/queries/db.ts';

const { db, unit, s, ids } = useWard({
  beds: 8,
  people: {
    nurse: ['nurse', 'unit'],
    charge: ['charge', 'unit'],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  },
});
const outreachAddress = `${unique('outreach')}@fixture.example`;
let bedCursor = 0;

async function admitWithBand(low = 92, high = 96) {
  const bedId = unit.bedIds[bedCursor++]!;
  // Ordered hours ago: readings are judged only against the band in force when they were taken.
  return (
    await createAdmittedPatient(db, {
      bedId,
      since: Date.now() - 6 * 3_600_000,
      band: { low, high, orderedBy: ids.intensivist, orderedAt: Date.now() - 5 * 3_600_000 },
    })
  ).patientId;
}

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();
async function chart(patientId: number, spo2: number, minsAgo = 0, trace = 'clean') {
  const res = await s.nurse.post(`/api/patients/${patientId}/observations`, {
    takenAt: minutesAgo(minsAgo),
    spo2,
    heartRate: 100,
    respRate: 22,
    device: 'simple_mask',
    flowLpm: 6,
    fio2: 0.4,
    trace,
    systolic: 118,
    temperature: 37.2,
    consciousness: 'alert',
  });
  expect(res.status, await res.clone().text()).toBe(201);
}
const escalationsOf = (patientId: number) => db('escalations').where({ patient_id: patientId }).orderBy('id');

beforeAll(async () => {
  await db('unit_settings').insert({ unit_id: unit.unitId, outreach_emails: outreachAddress });
});
afterAll(async () => {
  await smtp('start');
  await closeDb();
});

describe('escalations raised from obs, e-mailed through the outbox', () => {
  it('two trusted charted obs below band raise one escalation and one mail; a third raises nothing new', async () => {
    const p = await admitWithBand();
    await chart(p, 89, 20);
    expect(await escalationsOf(p)).toHaveLength(0);
    await chart(p, 88, 1);
    const [esc] = await escalationsOf(p);
    expect(esc).toMatchObject({ kind: 'below_band', severity: 'standard', state: 'raised' });
    const mails = await waitForMail((m) => m.key === `esc:${esc.id}:raised`);
    expect(mails).toHaveLength(1);
    expect(mails[0]!.to).toEqual([outreachAddress]);
    expect(mails[0]!.subject).toBe(`[Ebbwatch] Below band — Unit ${unit.code} bed F-1`);
    expect(mails[0]!.text).toContain('Ordered band: 92–96 %');
    expect(mails[0]!.text).toContain(`/patients/${p}`);
    expect(mails[0]!.text).not.toMatch(/Esc\b|ESC/); // minimum necessary: no name, no full MRN

    await chart(p, 89, 0); // still below, not urgent (87 would be 5 under: urgent)
    expect(await escalationsOf(p)).toHaveLength(1);
    await new Promise((r) => setTimeout(r, 1500));
    expect((await received()).filter((m) => m.key?.startsWith(`esc:${esc.id}:`))).toHaveLength(1);
    const events = await db('escalation_events').where({ escalation_id: esc.id }).pluck('type');
    expect(events).toEqual(['raised', 'notified']);
  });

  it('noisy-trace readings below band raise a probe check, never a below-band escalation', async () => {
    const p = await admitWithBand();
    await chart(p, 80, 20, 'noisy');
    await chart(p, 79, 10, 'noisy');
    await chart(p, 78, 0, 'absent');
    const rows = await escalationsOf(p);
    expect(rows.map((r) => r.kind)).toEqual(['probe_check']);
    expect(rows[0].severity).toBeNull();
    await new Promise((r) => setTimeout(r, 800));
    expect((await received()).some((m) => m.key?.startsWith(`esc:${rows[0].id}:`))).toBe(false); // a bedside task: no e-mail
    // A trusted reading in band ends the doubt: the probe check closes by itself, with why.
    await chart(p, 94, 0);
    const closed = (await escalationsOf(p))[0];
    expect(closed).toMatchObject({ state: 'closed', outcome: 'condition_cleared' });
  });

  it('marks an urgent run urgent (≥ 5 points under the lower limit, unit default)', async () => {
    const p = await admitWithBand();
    await chart(p, 86, 15);
    await chart(p, 85, 0);
    const [esc] = await escalationsOf(p);
    expect(esc.severity).toBe('urgent');
    const [mail] = await waitForMail((m) => m.key === `esc:${esc.id}:raised`);
    expect(mail!.subject).toContain('URGENT');
  });

  it('after closing, back in band then below again raises a new one; roles are checked on claim and close', async () => {
    const p = await admitWithBand();
    await chart(p, 89, 30);
    await chart(p, 88, 25);
    const [first] = await escalationsOf(p);
    expect((await s.intensivist.post(`/api/escalations/${first.id}/claim`)).status).toBe(403);
    expect((await s.admin.post(`/api/escalations/${first.id}/claim`)).status).toBe(403);
    expect((await s.nurse.post(`/api/escalations/${first.id}/close`, { outcome: 'other' })).status).toBe(403);
    const claim = await s.outreach.post(`/api/escalations/${first.id}/claim`);
    expect(claim.status).toBe(200);
    expect((await s.nurse.post(`/api/escalations/${first.id}/claim`)).status).toBe(409);
    const bad = await s.outreach.post(`/api/escalations/${first.id}/close`, { outcome: 'sorted' });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.fields).toHaveProperty('outcome');
    expect((await db('escalations').where({ id: first.id }).first()).state).toBe('claimed');
    const close = await s.outreach.post(`/api/escalations/${first.id}/close`, {
      outcome: 'treated_at_bedside',
      note: 'FiO₂ up, repositioned',
    });
    expect(close.status).toBe(200);
    const detail = await (await s.charge.get(`/api/escalations/${first.id}`)).json();
    expect(detail.events.map((e: { type: string }) => e.type)).toEqual(['raised', 'notified', 'claimed', 'closed']);
    expect(detail).toMatchObject({
      state: 'closed',
      outcome: 'treated_at_bedside',
      closeNote: 'FiO₂ up, repositioned',
    });

    await chart(p, 88, 20); // same run, still below: not raised again
    expect(await escalationsOf(p)).toHaveLength(1);
    await chart(p, 94, 15); // back in band
    await chart(p, 89, 10);
    await chart(p, 88, 0); // a new run below band
    const rows = await escalationsOf(p);
    expect(rows).toHaveLength(2);
    expect(rows[1].state).toBe('raised');
    expect(
      await db('audit_log')
        .where({ entity: 'escalation', entity_id: String(first.id) })
        .pluck('action'),
    ).toEqual(['escalation.raise', 'escalation.claim', 'escalation.close']);
  });

  it("re-notifies an unclaimed escalation once the unit's time has passed (clock injected)", async () => {
    const p = await admitWithBand();
    await chart(p, 89, 10);
    await chart(p, 89, 0);
    const [esc] = await escalationsOf(p);
    expect(await renotifyUnclaimed(new Date(Date.now() + 10 * 60_000), unit.unitId)).toBe(0);
    const later = new Date(Date.now() + 16 * 60_000);
    expect(await renotifyUnclaimed(later, unit.unitId)).toBeGreaterThanOrEqual(1);
    await deliverDueMail(later, { worker: 'test-clock' }); // the reminder is due at the injected time
    const [mail] = await waitForMail((m) => m.key === `esc:${esc.id}:renotify:1`);
    expect(mail!.subject).toContain('(reminder 1, not yet claimed)');
    expect((await db('escalations').where({ id: esc.id }).first()).notify_count).toBe(2);
  });

  it('lists open escalations oldest first for the unit, all units for outreach, none for admin', async () => {
    const mine = await (await s.nurse.get(`/api/escalations?state=open&unit=${unit.code}`)).json();
    const times = mine.escalations.map((e: { raisedAt: string }) => Date.parse(e.raisedAt));
    expect(times).toEqual([...times].sort((a, b) => a - b));
    expect(mine.escalations.every((e: { unit: { code: string } }) => e.unit.code === unit.code)).toBe(true);
    expect((await s.nurse.get('/api/escalations?state=open&unit=L4ICU')).status).toBe(403);
    expect((await s.outreach.get('/api/escalations?state=open')).status).toBe(200);
    expect((await s.admin.get('/api/escalations?state=open')).status).toBe(403);
    expect((await new HttpSession().get('/api/escalations')).status).toBe(401);
    expect((await s.outreach.get('/api/escalations?state=sideways')).status).toBe(400);
  });
});

describe('mail delivery faults', () => {
  it('with the SMTP server down, the escalation is raised and its mail delivered once after it is back', async () => {
    let esc: { id: number; state: string };
    let row: { status: string; attempts: number; last_error: string | null };
    await smtp('stop');
    try {
      const p = await admitWithBand();
      await chart(p, 89, 10);
      await chart(p, 89, 0);
      [esc] = await escalationsOf(p);
      expect(esc.state).toBe('raised');
      // The worker tries and fails; the row stays pending with the error, nothing is lost.
      const until = Date.now() + 10_000;
      do {
        row = await db('mail_outbox')
          .where({ idempotency_key: `esc:${esc.id}:raised` })
          .first();
        if (row.attempts > 0) break;
        await new Promise((r) => setTimeout(r, 200));
      } while (Date.now() < until);
      expect(row.status).toBe('pending');
      expect(row.attempts).toBeGreaterThan(0);
      expect(row.last_error).toBeTruthy();
    } finally {
      await smtp('start');
    }
    const mails = await waitForMail((m) => m.key === `esc:${esc.id}:raised`, 30_000);
    expect(mails).toHaveLength(1);
    await new Promise((r) => setTimeout(r, 1000));
    expect((await received()).filter((m) => m.key === `esc:${esc.id}:raised`)).toHaveLength(1);
    expect(
      (
        await db('mail_outbox')
          .where({ idempotency_key: `esc:${esc.id}:raised` })
          .first()
      ).status,
    ).toBe('sent');
  });

  it('two app instances and two more workers at once send each mail exactly once', async () => {
    // A second instance of the app, with its own outbox worker and sweep, on the same database.
    const second = await startInstance(Number(new URL(process.env.APP_URL!).port) + 9, { EBB_BACKGROUND: 'on' });
    const batch = unique('batch');
    const now = new Date();
    await db('mail_outbox').insert(
      Array.from({ length: 30 }, (_, i) => ({
        idempotency_key: `${batch}:${i}`,
        to_addresses: outreachAddress,
        subject: `race ${i}`,
        text_body: 'x',
        html_body: '<p>x</p>',
        created_at: now,
        next_attempt_at: now,
      })),
    );
    await Promise.all([
      (async () => {
        for (let i = 0; i < 10; i++) await deliverDueMail(new Date(), { worker: 'test-worker-A', limit: 3 });
      })(),
      (async () => {
        for (let i = 0; i < 10; i++) await deliverDueMail(new Date(), { worker: 'test-worker-B', limit: 3 });
      })(),
    ]);
    const until = Date.now() + 15_000;
    let got = (await received()).filter((m) => m.key?.startsWith(`${batch}:`));
    while (got.length < 30 && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 300));
      got = (await received()).filter((m) => m.key?.startsWith(`${batch}:`));
    }
    expect(got).toHaveLength(30);
    expect(new Set(got.map((m) => m.key)).size).toBe(30);
    const rows = await db('mail_outbox').where('idempotency_key', 'like', `${batch}:%`);
    expect(rows.every((r) => r.status === 'sent' && r.attempts === 1)).toBe(true);
    // More than one worker really took part (the race was real), and none sent a row twice.
    expect(new Set(rows.map((r) => r.claimed_by)).size).toBeGreaterThanOrEqual(2);
    await second.stop();
  });
});

describe('unit settings', () => {
  it('admins edit them with validation; others may not', async () => {
    const body = {
      consecutiveCharted: 3,
      deviceDwellMin: 8,
      urgentMarginPoints: 5,
      urgentFloorPct: 85,
      cannotVerifyMin: 15,
      aboveOnOxygenMin: 30,
      renotifyMin: 20,
      overdueMin: 75,
      outreachEmails: [outreachAddress],
    };
    expect((await s.charge.put(`/api/units/${unit.code}/settings`, body)).status).toBe(403);
    const bad = await s.admin.put(`/api/units/${unit.code}/settings`, {
      ...body,
      deviceDwellMin: 0,
      outreachEmails: ['nope'],
    });
    expect(bad.status).toBe(400);
    const fields = (await bad.json()).error.fields;
    expect(fields).toHaveProperty('deviceDwellMin');
    expect(fields).toHaveProperty('outreachEmails.0');
    expect((await db('unit_settings').where({ unit_id: unit.unitId }).first()).device_dwell_min).toBe(5);
    const ok = await s.admin.put(`/api/units/${unit.code}/settings`, body);
    expect(ok.status).toBe(200);
    expect((await ok.json()).settings).toMatchObject({ consecutiveCharted: 3, renotifyMin: 20 });
    expect((await s.charge.get(`/api/units/${unit.code}/settings`)).status).toBe(200);
    expect((await s.nurse.get(`/api/units/${unit.code}/settings`)).status).toBe(403);
  });

  it('admins read the outbox and what the SMTP fake received; nobody else', async () => {
    const res = await s.admin.get('/api/admin/mail');
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.outbox.length).toBeGreaterThan(0);
    expect(body.received.length).toBeGreaterThan(0);
    expect((await s.outreach.get('/api/admin/mail')).status).toBe(403);
  });
});
