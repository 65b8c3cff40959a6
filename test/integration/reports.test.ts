import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { countRows, createAdmittedPatient, rebuildPatientRollup } from '../support/db.ts';
import { useWard } from '../support/ward.ts';
import { lastWholeDays } from '../../src/lib/reports/shift.ts';
import { formatClock } from '../../src/lib/time/format.ts';
import { computeUnitReport } from '../../src/lib/server/reports/unit-report.ts';
import { patientSeries } from '../../src/lib/server/charting/series.ts';
import { closeDb } from '../../src/lib/server/queries/db.ts';

const { db, unit, s, ids } = useWard({
  beds: 3,
  otherBeds: 1,
  people: {
    charge: ['charge', 'unit'],
    nurse: ['nurse', 'unit'],
    otherCharge: ['charge', 'other'],
    otherNurse: ['nurse', 'other'],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  },
});
let patientId: number;
let yesterday: { date: string; from: number; to: number };
const MIN = 60_000;
const at = (h: number, m = 0) => new Date(yesterday.from + (h * 60 + m) * MIN);

beforeAll(async () => {
  // The hand-computed case of src/lib/reports/unit-report.test.ts, on yesterday (unit zone), through the database and the API.
  yesterday = lastWholeDays(Date.now(), 'Europe/London', 1)[0]!;
  ({ patientId } = await createAdmittedPatient(db, {
    bedId: unit.bedIds[0],
    since: yesterday.from - 60 * MIN,
    band: { low: 92, high: 96, orderedBy: ids.intensivist, orderedAt: yesterday.from - 60 * MIN },
  }));
  const charted = (t: Date, spo2: number, trace = 'clean') => ({
    patient_id: patientId,
    bed_id: unit.bedIds[0],
    taken_at: t,
    source: 'charted',
    spo2,
    heart_rate: 80,
    resp_rate: 18,
    trace,
    device: 'room_air',
    fio2: 0.21,
  });
  await db('observations').insert([
    charted(at(0), 95),
    charted(at(1), 90),
    charted(at(2), 94, 'noisy'),
    charted(at(3), 95),
  ]);
  // A corrected-away row must not count: it is superseded.
  await db('observations').insert({ ...charted(at(0, 30), 70), status: 'superseded' });
  await rebuildPatientRollup(db, patientId); // readings inserted directly: keep the per-minute rollup as every writer does
  const esc = (
    raised: Date,
    claimed: Date | null,
    closed: Date | null,
    kind = 'below_band',
    severity: string | null = 'standard',
  ) => ({
    patient_id: patientId,
    unit_id: unit.unitId,
    bed_id: unit.bedIds[0],
    kind,
    severity,
    state: closed ? 'closed' : claimed ? 'claimed' : 'raised',
    raised_at: raised,
    run_start: raised,
    run_end: raised,
    evidence: '{}',
    claimed_at: claimed,
    closed_at: closed,
    outcome: closed ? 'treated_at_bedside' : null,
  });
  await db('escalations').insert([
    esc(at(1, 10), at(1, 20), at(1, 50)),
    esc(at(5), at(5, 30), at(7), 'below_band', 'urgent'),
  ]);
  await db('escalations').insert(esc(at(2, 5), null, null, 'probe_check', null));
});
afterAll(async () => {
  await closeDb();
});

describe('GET /api/reports/units/:code', () => {
  it('answers charge nurses for their own unit, intensivists and admins for any; refuses the rest on the server', async () => {
    const path = `/api/reports/units/${unit.code}?days=7`;
    expect((await s.anon.get(path)).status).toBe(401);
    for (const who of ['nurse', 'outreach']) expect((await s[who].get(path)).status, who).toBe(403);
    expect((await s.otherCharge.get(path)).status).toBe(403);
    for (const who of ['charge', 'intensivist', 'admin']) expect((await s[who].get(path)).status, who).toBe(200);
    expect((await s.intensivist.get('/api/reports/units/NOSUCHUNIT?days=7')).status).toBe(404);
  });

  it('refuses a period other than 7, 30 or 90 days, naming the field', async () => {
    for (const bad of ['5', 'seven', '-7']) {
      const res = await s.charge.get(`/api/reports/units/${unit.code}?days=${bad}`);
      expect(res.status).toBe(400);
      expect((await res.json()).error.fields.days).toMatch(/7, 30 or 90/);
    }
  });

  it('gives the hand-computed figures for yesterday', async () => {
    const res = await s.charge.get(`/api/reports/units/${unit.code}?days=7`);
    const report = await res.json();
    expect(report.perDay).toHaveLength(7);
    const d = report.perDay[6];
    expect(d.date).toBe(yesterday.date);
    // 00:00 95 → 01:00 in band 60; 01:00 90 → 02:00 below 60; 02:00 noisy → 03:00 untrusted 60; 03:00 95 carries 75 min → 135 in band.
    expect(d.inBandMin).toBe(135);
    expect(d.belowMin).toBe(60);
    expect(d.untrustedMin).toBe(60);
    expect(d.timeInBandPct).toBe(69.2); // 135 / 195
    expect(d.patientDays).toBe(1);
    expect(d.belowMinPerPatientDay).toBe(60);
    expect(d.escalations).toEqual({ belowStandard: 1, belowUrgent: 1, probeCheck: 1, weanPrompt: 0 });
    expect(d.toClaimMin).toEqual({ n: 2, median: 20, p90: 28 }); // 10 and 30 min
    expect(d.toCloseMin).toEqual({ n: 2, median: 60, p90: 84 }); // 30 and 90 min
    expect(d.overdueCount).toBe(1); // due 04:15, nothing after 03:00
    expect(d.untrustedSharePct).toBe(25); // 1 of 4 current readings
    expect(report.total.belowMin).toBe(60);
  });

  it('agrees with the bed chart for the same patient and window', async () => {
    // Add a device spell with a dip and poor traces, so the agreement is not only about charted obs.
    const rows = [];
    for (let m = 0; m < 180; m++) {
      const spo2 = m >= 60 && m < 90 ? 88 : 94;
      rows.push({
        patient_id: patientId,
        bed_id: unit.bedIds[0],
        taken_at: at(10, m),
        source: 'device',
        spo2,
        heart_rate: 90,
        trace: m >= 120 && m < 140 ? 'noisy' : 'clean',
      });
    }
    await db('observations').insert(rows);
    await rebuildPatientRollup(db, patientId);
    const unitRow = { id: unit.unitId, code: unit.code, name: 'x', hospital: 'x', time_zone: 'Europe/London' };
    const { figures } = await computeUnitReport(unitRow, 7, new Date());
    const day = figures.patientDays.find((p) => p.patientId === patientId && p.date === yesterday.date)!;
    const user = {
      id: ids.intensivist,
      email: 'x',
      name: 'x',
      role: 'intensivist' as const,
      unitId: null,
      unitCode: null,
      unitName: null,
    };
    // The bed chart's 24 h window ending at today's local midnight is exactly yesterday (no clock change in it).
    const series = await patientSeries(user, patientId, 24, new Date(yesterday.to));
    expect(yesterday.to - yesterday.from).toBe(24 * 3_600_000);
    const c = series.derived.compliance;
    const r1 = (v: number) => Math.round(v * 10) / 10;
    expect(r1(day.inBandMin)).toBe(c.inBandMin);
    expect(r1(day.belowMin)).toBe(c.belowMin);
    expect(r1(day.aboveMin)).toBe(c.aboveMin);
    expect(r1(day.untrustedMin)).toBe(c.untrustedMin);
    expect(r1(day.burdenPctMin)).toBe(c.burdenPctMin);
    expect(r1(day.timeInBandPct!)).toBe(c.inBandPct);
    expect(day.trustedReadings).toBe(c.trustedReadings);
    expect(day.untrustedReadings).toBe(c.untrustedReadings);
    expect(day.belowMin).toBeGreaterThan(60); // the device dip counted too
  });

  it('downloads the same figures as CSV with days and times in the unit zone', async () => {
    const res = await s.charge.get(`/api/reports/units/${unit.code}/csv?days=7`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(res.headers.get('content-disposition')).toContain(`ebbwatch-report-${unit.code}-7d-`);
    const lines = (await res.text()).trim().split('\r\n');
    expect(lines).toHaveLength(1 + 7 + 1);
    expect(lines[0]).toMatch(/^day,from,to,patient_days,time_in_band_pct/);
    // "1 Dec 2026,1 Dec 2026 00:00,2 Dec 2026 00:00,…": day-first, month as a word, local midnight.
    expect(lines[7]).toMatch(
      /^\d{1,2} [A-Z][a-z]{2} \d{4},\d{1,2} [A-Z][a-z]{2} \d{4} 00:00,\d{1,2} [A-Z][a-z]{2} \d{4} 00:00,1,/,
    );
    expect(lines[8]).toMatch(/^total 7 days,/);
    expect((await s.nurse.get(`/api/reports/units/${unit.code}/csv?days=7`)).status).toBe(403);
  });

  it('gives intensivists and admins every unit side by side, and nobody else', async () => {
    const res = await s.admin.get('/api/reports/hospital?days=7');
    expect(res.status).toBe(200);
    const body = await res.json();
    const codes = body.units.map((u: { unit: { code: string } }) => u.unit.code);
    expect(codes).toEqual(expect.arrayContaining(['L4ICU', 'L5HDU', unit.code]));
    expect(
      body.units.find((u: { unit: { code: string } }) => u.unit.code === unit.code).total.belowMin,
    ).toBeGreaterThan(60);
    for (const who of ['charge', 'nurse', 'outreach'])
      expect((await s[who].get('/api/reports/hospital?days=7')).status, who).toBe(403);
    expect((await s.anon.get('/api/reports/hospital')).status).toBe(401);
  });

  it('shows the demo units with at least 14 days of history', async () => {
    const res = await s.intensivist.get('/api/reports/units/L4ICU?days=30');
    const report = await res.json();
    const withPatients = report.perDay.filter(
      (d: { patientDays: number; timeInBandPct: number | null }) => d.patientDays > 3 && d.timeInBandPct !== null,
    );
    expect(withPatients.length).toBeGreaterThanOrEqual(14);
    expect(report.total.escalations.belowStandard + report.total.escalations.belowUrgent).toBeGreaterThan(0);
    expect(report.total.toClaimMin.n).toBeGreaterThan(0);
  });
});

describe('handover sheet and notes', () => {
  it('gives the charge nurse every bed of the unit and a nurse their own beds unless asked for the unit', async () => {
    await db('bed_assignments').insert({
      bed_id: unit.bedIds[0],
      nurse_id: ids.nurse,
      assigned_by: ids.charge,
      assigned_at: new Date(),
    });
    const unitSheet = await (await s.charge.get(`/api/handover?unit=${unit.code}`)).json();
    expect(unitSheet.scope).toBe('unit');
    expect(unitSheet.beds.map((b: { bedLabel: string }) => b.bedLabel)).toEqual(['F-1', 'F-2', 'F-3']);
    expect(unitSheet.beds[1].patient).toBeNull();
    const mine = await (await s.nurse.get('/api/handover')).json();
    expect(mine.scope).toBe('mine');
    expect(mine.beds.map((b: { bedLabel: string }) => b.bedLabel)).toEqual(['F-1']);
    expect(mine.beds[0].patient.nurse).toBe('Fixture nurse');
    const all = await (await s.nurse.get('/api/handover?scope=unit')).json();
    expect(all.beds).toHaveLength(3);
    expect((await s.otherNurse.get(`/api/handover?unit=${unit.code}`)).status).toBe(403);
    expect((await s.admin.get('/api/handover')).status).toBe(403);
    expect((await s.anon.get('/api/handover')).status).toBe(401);
    expect((await s.charge.get('/api/handover?scope=everyone')).status).toBe(400);
  });

  it('covers the shift that contains now, with the default 07:30 / 19:30 times', async () => {
    const sheet = await (await s.charge.get(`/api/handover?unit=${unit.code}`)).json();
    expect(sheet.shift.start).toBe('07:30');
    expect(sheet.shift.end).toBe('19:30');
    const from = new Date(sheet.shift.from).getTime();
    const to = new Date(sheet.shift.to).getTime();
    expect(from).toBeLessThanOrEqual(Date.now());
    expect(to).toBeGreaterThan(Date.now());
    expect(to - from).toBe(12 * 3_600_000);
  });

  it('takes shift times from the unit settings (admin), refusing malformed times', async () => {
    const body = {
      consecutiveCharted: 2,
      deviceDwellMin: 5,
      urgentMarginPoints: 5,
      urgentFloorPct: 85,
      cannotVerifyMin: 15,
      aboveOnOxygenMin: 30,
      renotifyMin: 15,
      overdueMin: 75,
      outreachEmails: ['outreach@fixture.example'],
    };
    const bad = await s.admin.put(`/api/units/${unit.code}/settings`, {
      ...body,
      shiftStart: '25:00',
      shiftEnd: '20:00',
    });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.fields.shiftStart).toBe('Shift start as HH:MM, 24-hour');
    const ok = await s.admin.put(`/api/units/${unit.code}/settings`, {
      ...body,
      shiftStart: '08:00',
      shiftEnd: '20:00',
    });
    expect(ok.status).toBe(200);
    expect((await ok.json()).settings).toMatchObject({ shiftStart: '08:00', shiftEnd: '20:00' });
    const sheet = await (await s.charge.get(`/api/handover?unit=${unit.code}`)).json();
    expect(sheet.shift).toMatchObject({ start: '08:00', end: '20:00' });
    expect(['08:00', '20:00']).toContain(formatClock(sheet.shift.from, 'Europe/London'));
    // Saving settings without the shift keeps the shift.
    await s.admin.put(`/api/units/${unit.code}/settings`, body);
    expect((await (await s.charge.get(`/api/units/${unit.code}/settings`)).json()).settings.shiftStart).toBe('08:00');
  });

  it('saves notes as versions (audited), refuses a stale base, bad input and the wrong people, and shows the newest on the sheet', async () => {
    const path = `/api/patients/${patientId}/handover-notes`;
    const before = await countRows(db, 'handover_notes');
    const bad = await s.nurse.post(path, { note: '   ', basedOnVersion: null });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.fields.note).toBe('Write the note');
    expect((await s.anon.post(path, { note: 'x', basedOnVersion: null })).status).toBe(401);
    for (const who of ['outreach', 'intensivist', 'admin', 'otherNurse'])
      expect((await s[who].post(path, { note: 'x', basedOnVersion: null })).status, who).toBe(403);
    expect(await countRows(db, 'handover_notes')).toBe(before);

    const first = await s.nurse.post(path, { note: 'Dip at 11:00 settled with repositioning.', basedOnVersion: null });
    expect(first.status).toBe(201);
    expect((await first.json()).note).toMatchObject({ version: 1, writtenBy: 'Fixture nurse' });
    const stale = await s.charge.post(path, { note: 'Another', basedOnVersion: null });
    expect(stale.status).toBe(409);
    expect((await stale.json()).error.code).toBe('stale_note');
    const second = await s.charge.post(path, { note: 'Reviewed: keep band 92–96 %.', basedOnVersion: 1 });
    expect(second.status).toBe(201);

    const rows = await db('handover_notes').where({ patient_id: patientId }).orderBy('version');
    expect(rows.map((r) => [r.version, r.note])).toEqual([
      [1, 'Dip at 11:00 settled with repositioning.'],
      [2, 'Reviewed: keep band 92–96 %.'],
    ]);
    expect(rows[1].supersedes_id).toBe(rows[0].id);
    expect(
      await db('audit_log')
        .where({ entity: 'patient', entity_id: String(patientId), action: 'handover_note.write' })
        .count({ n: '*' })
        .first(),
    ).toEqual({ n: 2 });
    const list = await (await s.intensivist.get(path)).json();
    expect(list.notes.map((n: { version: number }) => n.version)).toEqual([2, 1]);
    const sheet = await (await s.charge.get(`/api/handover?unit=${unit.code}`)).json();
    expect(sheet.beds[0].patient.note).toMatchObject({ version: 2, note: 'Reviewed: keep band 92–96 %.' });
  });

  it('lists all 12 demo ICU beds, with the note the last shift left', async () => {
    const sheet = await (await s.intensivist.get('/api/handover?unit=L4ICU')).json();
    expect(sheet.beds).toHaveLength(12);
    const b1 = sheet.beds.find((b: { bedLabel: string }) => b.bedLabel === '4-01');
    expect(b1.patient.note.version).toBeGreaterThanOrEqual(1);
    expect(b1.patient.lowest.spo2).toBeLessThan(92); // the demo desaturation
    expect(b1.patient.compliance.belowMin).toBeGreaterThan(0);
    const overdue = sheet.beds.find((b: { bedLabel: string }) => b.bedLabel === '4-05');
    expect(overdue.patient.overdueMin).toBeGreaterThan(75);
  });
});
