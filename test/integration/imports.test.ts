import { beforeAll, describe, expect, it } from 'vitest';
import type { HttpSession } from '../support/app.ts';
import { countRows, createAdmittedPatient, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s, ids } = useWard({
  beds: 6,
  otherBeds: 1,
  people: {
    nurse: ['nurse', 'unit'],
    charge: ['charge', 'unit'],
    otherNurse: ['nurse', 'other'],
    intensivist: ['intensivist', null],
  },
});

async function patientInBed(bedIndex: number, from: Date) {
  return (await createAdmittedPatient(db, { bedId: unit.bedIds[bedIndex], since: from })).patientId;
}

const MAPPING = {
  time: 'Recorded',
  spo2: 'Sat %',
  heartRate: 'Pulse',
  perfusionIndex: 'PI',
  quality: 'Signal',
  timeMode: 'iso',
};

function upload(
  session: HttpSession,
  patientId: number,
  step: 'preview' | 'commit',
  csv: string | Buffer,
  mapping: Record<string, string> = MAPPING,
  extra: Record<string, string> = {},
) {
  const q = new URLSearchParams({ ...mapping, fileName: 'bed-monitor-export.csv', ...extra });
  return session.request(`/api/patients/${patientId}/imports/${step}?${q}`, {
    method: 'POST',
    headers: { 'content-type': 'text/csv' },
    body: typeof csv === 'string' ? csv : new Uint8Array(csv),
  });
}

/** A trend file with its columns in an unusual order and names, one row a minute from `start` (ms). */
function trendCsv(start: number, n: number, opts: { spo2?: (i: number) => number | string; salt?: string } = {}) {
  const lines = ['Signal,Pulse,Bed,Recorded,PI,Sat %'];
  for (let i = 0; i < n; i++)
    lines.push(`clean,${70 + (i % 10)},X,${new Date(start + i * 60_000).toISOString()},1.8,${opts.spo2?.(i) ?? 94}`);
  if (opts.salt) lines.push(`# ${opts.salt}`.replace(/^# /, ''));
  return `${lines.join('\n')}\n`;
}

const importRows = (patientId: number) => db('observations').where({ patient_id: patientId, source: 'import' });

describe('trend file upload: who may', () => {
  it('lets nurses and charge nurses of the unit upload; refuses others on the server, storing nothing', async () => {
    const p = await patientInBed(0, new Date(Date.now() - 6 * 3_600_000));
    const csv = trendCsv(Date.now() - 3 * 3_600_000, 5);
    const before = await countRows(db, 'observations');
    const importsBefore = await countRows(db, 'observation_imports');
    expect((await upload(s.anon, p, 'preview', csv)).status).toBe(401);
    expect((await upload(s.intensivist, p, 'commit', csv)).status).toBe(403);
    expect((await upload(s.otherNurse, p, 'commit', csv)).status).toBe(403);
    expect((await upload(s.charge, p, 'preview', csv)).status).toBe(200);
    const wrongType = await s.nurse.request(
      `/api/patients/${p}/imports/preview?${new URLSearchParams({ ...MAPPING, fileName: 'a.csv' })}`,
      { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' },
    );
    expect(wrongType.status).toBe(415);
    expect(await countRows(db, 'observations')).toBe(before);
    expect(await countRows(db, 'observation_imports')).toBe(importsBefore);
  });
});

describe('trend file upload: preview and commit', () => {
  let patientId: number;
  // Whole seconds, so "the same second as a stored reading" below does not depend on the clock's milliseconds.
  const admittedAt = Math.floor(Date.now() / 1000) * 1000 - 10 * 3_600_000;
  beforeAll(async () => {
    patientId = await patientInBed(1, new Date(admittedAt));
  });

  it('previews with the chosen mapping without storing anything, then commits exactly what it previewed as one import', async () => {
    const start = Date.now() - 4 * 3_600_000;
    const csv = trendCsv(start, 120, { spo2: (i) => (i === 7 ? 'n/a' : 90 + (i % 8)) });
    const obsBefore = await countRows(db, 'observations');
    const impBefore = await countRows(db, 'observation_imports');
    const res = await upload(s.nurse, patientId, 'preview', csv);
    expect(res.status, await res.clone().text()).toBe(200);
    const { preview } = await res.json();
    expect(preview).toMatchObject({
      rowCount: 120,
      readable: 119,
      toStore: 119,
      fileName: 'bed-monitor-export.csv',
      timeZone: 'Europe/London',
    });
    expect(preview.span).toEqual({
      first: new Date(start).toISOString(),
      last: new Date(start + 119 * 60_000).toISOString(),
    });
    expect(preview.refused).toMatchObject({
      count: 1,
      rows: [{ line: 9, reason: 'SpO₂ "n/a" is not a number' }],
      groups: [{ reason: 'SpO₂ is not a number', field: 'spo2', count: 1, firstLines: [9] }],
    });
    expect(preview.headers).toEqual(['Signal', 'Pulse', 'Bed', 'Recorded', 'PI', 'Sat %']);
    expect(await countRows(db, 'observations')).toBe(obsBefore);
    expect(await countRows(db, 'observation_imports')).toBe(impBefore);

    const commit = await upload(s.nurse, patientId, 'commit', csv, MAPPING, { expectHash: preview.fileHash });
    expect(commit.status, await commit.clone().text()).toBe(201);
    const body = await commit.json();
    expect(body.import).toMatchObject({
      rowsInFile: 120,
      rowsStored: 119,
      rowsRefused: 1,
      rowsSkipped: 0,
      fileName: 'bed-monitor-export.csv',
      committedBy: 'Fixture nurse',
      withdrawnAt: null,
    });
    const rows = await importRows(patientId).orderBy('taken_at');
    expect(rows).toHaveLength(119);
    expect(rows[0]).toMatchObject({
      spo2: 90,
      heart_rate: 70,
      trace: 'clean',
      import_id: body.import.id,
      recorded_by: ids.nurse,
      status: 'current',
      bed_id: unit.bedIds[1],
    });
    expect(Number(rows[0].perfusion_index)).toBe(1.8);
    expect(new Date(rows[0].taken_at).toISOString()).toBe(new Date(start).toISOString());
    const audit = await db('audit_log')
      .where({ entity: 'observation_import', entity_id: String(body.import.id) })
      .pluck('action');
    expect(audit).toEqual(['import.commit']);

    // The mapping is remembered for the unit.
    const list = await (await s.charge.get(`/api/patients/${patientId}/imports`)).json();
    expect(list.mapping).toEqual(MAPPING);
    expect(list.imports.map((i: { id: number }) => i.id)).toEqual([body.import.id]);
    // And the chart's series now counts them.
    const series = await (await s.nurse.get(`/api/patients/${patientId}/series?hours=6`)).json();
    expect(series.rawCounts.spo2).toBe(119);
  });

  it('refuses a commit of a file other than the one previewed', async () => {
    const csv = trendCsv(Date.now() - 5 * 3_600_000, 3);
    const res = await upload(s.nurse, patientId, 'commit', csv, MAPPING, { expectHash: 'a'.repeat(64) });
    expect(res.status).toBe(409);
    expect((await res.json()).error.code).toBe('file_changed');
  });

  it('refuses the same file twice (preview says so too), and any mapping that misses a column', async () => {
    const csv = trendCsv(Date.now() - 9 * 3_600_000, 30);
    expect((await upload(s.nurse, patientId, 'commit', csv)).status).toBe(201);
    const preview = (await (await upload(s.charge, patientId, 'preview', csv)).json()).preview;
    expect(preview.alreadyImported).toMatchObject({ samePatient: true, committedBy: 'Fixture nurse' });
    const before = await countRows(db, 'observations');
    const again = await upload(s.charge, patientId, 'commit', csv);
    expect(again.status).toBe(409);
    expect((await again.json()).error.code).toBe('duplicate_file');
    expect(await countRows(db, 'observations')).toBe(before);

    const missing = await upload(s.nurse, patientId, 'preview', csv, { ...MAPPING, quality: 'Trace' });
    expect(missing.status).toBe(400);
    expect((await missing.json()).error.fields.quality).toMatch(/"Trace" is not in the file/);
    const noMode = await upload(s.nurse, patientId, 'preview', csv, {
      time: 'Recorded',
      spo2: 'Sat %',
      heartRate: 'Pulse',
    });
    expect(Object.keys((await noMode.json()).error.fields)).toEqual(['timeMode']);
  });

  it('skips rows outside the admission and rows at the second of a stored reading, and says which', async () => {
    // Starts 30 min before admission; one stored device reading sits at the 40th minute.
    const start = admittedAt - 30 * 60_000;
    await db('observations').insert({
      patient_id: patientId,
      taken_at: new Date(start + 40 * 60_000 + 300),
      source: 'device',
      spo2: 97,
      trace: 'clean',
    });
    const csv = trendCsv(start, 60);
    const { preview } = await (await upload(s.nurse, patientId, 'preview', csv)).json();
    expect(preview.outsideAdmission.count).toBe(30);
    expect(preview.outsideAdmission.examples[0]).toEqual({ line: 2, at: new Date(start).toISOString() });
    expect(preview.overlapping).toEqual({
      count: 1,
      examples: [{ line: 42, at: new Date(start + 40 * 60_000).toISOString() }],
    });
    expect(preview.toStore).toBe(29);
    const body = await (await upload(s.nurse, patientId, 'commit', csv)).json();
    expect(body.import).toMatchObject({ rowsStored: 29, rowsSkipped: 31 });
  });

  it('refuses a file over 20 MB', async () => {
    const big = Buffer.alloc(20 * 1024 * 1024 + 10, 'a');
    const res = await upload(s.nurse, patientId, 'preview', big);
    expect(res.status).toBe(413);
  });
});

describe('trend file upload: unit local time across daylight-saving changes (Europe/London)', () => {
  let patientId: number;
  beforeAll(async () => {
    patientId = await patientInBed(2, new Date('2026-03-01T00:00:00Z'));
  });
  const local = { time: 'Time', spo2: 'SpO2', heartRate: 'HR', timeMode: 'local' };
  // An unmapped column unique to this run, so rerunning against the same database is not "the same file twice".
  const run = unique('run');
  const tag = (csv: string) =>
    csv
      .split('\n')
      .map((l, i) => (l === '' ? l : `${l},${i === 0 ? 'Monitor' : run}`))
      .join('\n');

  it('reads the repeated autumn hour in file order: every minute once, in time order', async () => {
    // 25 Oct 2026: 00:30 to 02:29 on the wall clock, a reading a minute; 01:00–01:59 comes twice.
    const lines = ['Time,SpO2,HR'];
    const pad = (n: number) => String(n).padStart(2, '0');
    for (let m = 30; m < 60; m++) lines.push(`2026-10-25 00:${pad(m)}:00,95,80`);
    for (let pass = 0; pass < 2; pass++)
      for (let m = 0; m < 60; m++) lines.push(`2026-10-25 01:${pad(m)}:00,${pass === 0 ? 95 : 93},80`);
    for (let m = 0; m < 30; m++) lines.push(`2026-10-25 02:${pad(m)}:00,95,80`);
    const csv = tag(`${lines.join('\n')}\n`);
    const { preview } = await (await upload(s.nurse, patientId, 'preview', csv, local)).json();
    expect(preview).toMatchObject({ rowCount: 180, toStore: 180, refused: { count: 0 } });
    // BST is UTC+1 until 01:00 UTC; GMT after. So 00:30 BST = 23:30 UTC the day before, 02:29 GMT = 02:29 UTC.
    expect(preview.span).toEqual({ first: '2026-10-24T23:30:00.000Z', last: '2026-10-25T02:29:00.000Z' });
    expect(preview.notes.map((n: { line: number }) => n.line)).toEqual([32, 92]);
    expect((await upload(s.nurse, patientId, 'commit', csv, local)).status).toBe(201);
    const times = (
      await importRows(patientId)
        .andWhere('taken_at', '>=', new Date('2026-10-24T00:00:00Z'))
        .orderBy('id')
        .select('taken_at', 'spo2')
    ).map((r) => ({ t: new Date(r.taken_at).getTime(), spo2: r.spo2 }));
    expect(times).toHaveLength(180);
    for (let i = 1; i < times.length; i++) expect(times[i]!.t - times[i - 1]!.t).toBe(60_000);
    // The second pass (SpO₂ 93) is 01:00–01:59 GMT = 01:00–01:59 UTC.
    expect(new Date(times.find((x) => x.spo2 === 93)!.t).toISOString()).toBe('2026-10-25T01:00:00.000Z');
  });

  it('refuses the spring hour that does not exist, with line numbers, and stores the rest', async () => {
    const csv = tag(
      'Time,SpO2,HR\n29/03/2026 00:58:00,96,70\n29/03/2026 00:59:00,96,70\n29/03/2026 01:00:00,96,70\n29/03/2026 01:59:00,96,70\n29/03/2026 02:00:00,96,70\n',
    );
    const { preview } = await (await upload(s.nurse, patientId, 'preview', csv, local)).json();
    expect(preview.refused.rows).toMatchObject([
      { line: 4, reason: 'time 2026-03-29 01:00:00 does not exist in Europe/London (the clocks went forward)' },
      { line: 5, reason: 'time 2026-03-29 01:59:00 does not exist in Europe/London (the clocks went forward)' },
    ]);
    expect(preview.span).toEqual({ first: '2026-03-29T00:58:00.000Z', last: '2026-03-29T01:00:00.000Z' });
    const body = await (await upload(s.nurse, patientId, 'commit', csv, local)).json();
    expect(body.import).toMatchObject({ rowsStored: 3, rowsRefused: 2 });
  });
});

describe('withdrawing an import', () => {
  it('marks its readings withdrawn (never deleted), records who, when and why, and the chart drops them', async () => {
    const p = await patientInBed(3, new Date(Date.now() - 8 * 3_600_000));
    const csv = trendCsv(Date.now() - 3 * 3_600_000, 60, { spo2: () => 88 });
    const { import: imp } = await (await upload(s.nurse, p, 'commit', csv)).json();
    expect((await (await s.nurse.get(`/api/patients/${p}/series?hours=6`)).json()).rawCounts.spo2).toBe(60);
    const total = await countRows(db, 'observations');

    expect((await s.intensivist.post(`/api/imports/${imp.id}/withdraw`, { reason: 'wrong patient' })).status).toBe(403);
    expect((await s.otherNurse.post(`/api/imports/${imp.id}/withdraw`, { reason: 'wrong patient' })).status).toBe(403);
    const noReason = await s.nurse.post(`/api/imports/${imp.id}/withdraw`, { reason: '' });
    expect(Object.keys((await noReason.json()).error.fields)).toEqual(['reason']);

    const res = await s.charge.post(`/api/imports/${imp.id}/withdraw`, {
      reason: 'Exported from the neighbouring monitor',
    });
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await res.json()).import).toMatchObject({
      readingsWithdrawn: 60,
      withdrawnBy: 'Fixture charge',
      withdrawReason: 'Exported from the neighbouring monitor',
    });
    expect(await countRows(db, 'observations')).toBe(total);
    const rows = await importRows(p);
    expect(rows).toHaveLength(60);
    expect(
      rows.every(
        (r) => r.status === 'withdrawn' && r.status_by === ids.charge && /neighbouring monitor/.test(r.status_reason),
      ),
    ).toBe(true);
    expect((await (await s.nurse.get(`/api/patients/${p}/series?hours=6`)).json()).rawCounts.spo2).toBe(0);
    expect(
      await db('audit_log')
        .where({ entity: 'observation_import', entity_id: String(imp.id) })
        .orderBy('id')
        .pluck('action'),
    ).toEqual(['import.commit', 'import.withdraw']);
    expect((await s.charge.post(`/api/imports/${imp.id}/withdraw`, { reason: 'again please' })).status).toBe(409);
    expect((await s.charge.post('/api/imports/99999999/withdraw', { reason: 'no such' })).status).toBe(404);

    // Once withdrawn, the same file may come in again (e.g. after fixing the mapping).
    expect((await upload(s.nurse, p, 'commit', csv)).status).toBe(201);
  });
});
