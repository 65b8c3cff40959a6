import { describe, expect, it } from 'vitest';
import type { HttpSession } from '../support/app.ts';
import { countRows, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s } = useWard({
  beds: 3,
  people: {
    admin: ['admin', null],
    charge: ['charge', 'unit'],
    nurse: ['nurse', 'unit'],
    intensivist: ['intensivist', null],
  },
});

const patch = (who: HttpSession, path: string, json: unknown) => who.request(path, { method: 'PATCH', json });
const code = () => unique('W').slice(0, 12).toUpperCase();

describe('units and beds: roles', () => {
  it('are for administrators only', async () => {
    expect((await s.anon.get('/api/admin/units')).status).toBe(401);
    for (const who of ['nurse', 'charge', 'intensivist']) {
      expect((await s[who].get('/api/admin/units')).status, who).toBe(403);
      expect(
        (await s[who].post('/api/admin/units', { code: 'X1', name: 'Ward', hospital: 'H1', timeZone: 'UTC' })).status,
        who,
      ).toBe(403);
      expect((await patch(s[who], `/api/admin/units/${unit.code}`, { name: 'Renamed' })).status, who).toBe(403);
      expect((await s[who].post(`/api/admin/units/${unit.code}/beds`, { label: 'Z9' })).status, who).toBe(403);
      expect((await s[who].put(`/api/admin/units/${unit.code}/beds`, { bedIds: unit.bedIds })).status, who).toBe(403);
      expect(
        (await patch(s[who], `/api/admin/units/${unit.code}/beds/${unit.bedIds[0]}`, { label: 'Z9' })).status,
        who,
      ).toBe(403);
      expect(
        (await s[who].post(`/api/admin/units/${unit.code}/beds/${unit.bedIds[0]}/retire`, { reason: 'broken' })).status,
        who,
      ).toBe(403);
    }
    const res = await s.admin.get('/api/admin/units');
    expect(res.status).toBe(200);
    const found = (await res.json()).units.find((u: { code: string }) => u.code === unit.code);
    expect(found.beds.map((b: { id: number }) => b.id)).toEqual(unit.bedIds);
  });
});

describe('units', () => {
  it('creates a unit with code, name, hospital and zone; refuses a bad zone (naming it) and a duplicate code', async () => {
    const before = await countRows(db, 'units');
    let res = await s.admin.post('/api/admin/units', {
      code: 'bad code!',
      name: '',
      hospital: 'Harbourside General',
      timeZone: 'Atlantis/Nowhere',
    });
    expect(res.status).toBe(400);
    expect(Object.keys((await res.json()).error.fields).sort()).toEqual(['code', 'name', 'timeZone']);
    expect(await countRows(db, 'units')).toBe(before);
    const c = code();
    res = await s.admin.post('/api/admin/units', {
      code: c.toLowerCase(),
      name: 'Level 6 HDU',
      hospital: 'Harbourside General',
      timeZone: 'Pacific/Auckland',
    });
    expect(res.status, await res.clone().text()).toBe(201);
    expect(await db('units').where({ code: c }).first()).toMatchObject({
      name: 'Level 6 HDU',
      time_zone: 'Pacific/Auckland',
    });
    res = await s.admin.post('/api/admin/units', {
      code: c,
      name: 'Again',
      hospital: 'Harbourside General',
      timeZone: 'UTC',
    });
    expect(res.status).toBe(409);
    expect((await res.json()).error.code).toBe('duplicate_code');

    res = await patch(s.admin, `/api/admin/units/${c}`, { name: 'Level 6 Step-down' });
    expect(res.status).toBe(200);
    expect((await db('units').where({ code: c }).first()).name).toBe('Level 6 Step-down');
    expect((await patch(s.admin, '/api/admin/units/NOSUCH', { name: 'Ghost' })).status).toBe(404);
    expect((await patch(s.admin, `/api/admin/units/${c}`, {})).status).toBe(400);
    const audit = await db('audit_log')
      .where({ entity: 'unit' })
      .whereIn('action', ['unit.create', 'unit.update'])
      .orderBy('id', 'desc')
      .limit(2)
      .select('action');
    expect(audit.map((a) => a.action)).toEqual(['unit.update', 'unit.create']);
  });
});

describe('beds', () => {
  it('adds, renames and reorders beds; the board and bed lists follow the order', async () => {
    let res = await s.admin.post(`/api/admin/units/${unit.code}/beds`, { label: 'F-9' });
    expect(res.status).toBe(201);
    const added = (await res.json()).bed.id as number;
    res = await s.admin.post(`/api/admin/units/${unit.code}/beds`, { label: 'F-9' });
    expect(res.status).toBe(409);
    expect((await res.json()).error.fields.label).toBeTruthy();
    expect((await s.admin.post(`/api/admin/units/${unit.code}/beds`, { label: '' })).status).toBe(400);
    res = await patch(s.admin, `/api/admin/units/${unit.code}/beds/${added}`, { label: 'Side room' });
    expect(res.status).toBe(200);
    expect((await patch(s.admin, `/api/admin/units/${unit.code}/beds/${added}`, { label: 'F-1' })).status).toBe(409);

    const all = [...unit.bedIds, added];
    res = await s.admin.put(`/api/admin/units/${unit.code}/beds`, { bedIds: all.slice(1) });
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.bedIds).toMatch(/every active bed/);
    const order = [added, ...unit.bedIds.slice().reverse()];
    res = await s.admin.put(`/api/admin/units/${unit.code}/beds`, { bedIds: order });
    expect(res.status).toBe(200);
    const beds = await (await s.charge.get(`/api/units/${unit.code}/beds`)).json();
    expect(beds.beds.map((b: { id: number }) => b.id)).toEqual(order);
    expect(beds.beds[0].label).toBe('Side room');
  });

  it('will not retire a bed with a patient; a retired bed keeps its history and takes no admission', async () => {
    const res0 = await s.charge.post('/api/patients', {
      givenName: 'Rhea',
      familyName: unique('Bed'),
      mrn: unique('RB').toUpperCase().slice(0, 20),
      dateOfBirth: '1950-02-03',
      bedId: unit.bedIds[1],
    });
    expect(res0.status, await res0.clone().text()).toBe(201);
    const patient = (await res0.json()).patient;
    let res = await s.admin.post(`/api/admin/units/${unit.code}/beds/${unit.bedIds[1]}/retire`, {
      reason: 'monitor arm broken',
    });
    expect(res.status).toBe(409);
    expect((await res.json()).error.code).toBe('bed_occupied');
    expect((await db('beds').where({ id: unit.bedIds[1] }).first()).active).toBe(1);
    expect((await s.admin.post(`/api/admin/units/${unit.code}/beds/${unit.bedIds[1]}/retire`, {})).status).toBe(400);

    // Discharge, then retire: the stay stays on record.
    expect((await s.charge.post(`/api/patients/${patient.id}/discharge`, {})).status).toBe(200);
    res = await s.admin.post(`/api/admin/units/${unit.code}/beds/${unit.bedIds[1]}/retire`, {
      reason: 'monitor arm broken',
    });
    expect(res.status).toBe(200);
    expect(await db('bed_stays').where({ bed_id: unit.bedIds[1] }).count({ n: '*' })).toEqual([{ n: 1 }]);
    expect(
      (await s.admin.post(`/api/admin/units/${unit.code}/beds/${unit.bedIds[1]}/retire`, { reason: 'again' })).status,
    ).toBe(409);

    res = await s.charge.post('/api/patients', {
      givenName: 'Rhea',
      familyName: patient.familyName,
      mrn: patient.mrn,
      dateOfBirth: '1950-02-03',
      bedId: unit.bedIds[1],
    });
    expect(res.status).toBe(409);
    expect((await res.json()).error.code).toBe('bed_retired');
    const beds = await (await s.charge.get(`/api/units/${unit.code}/beds`)).json();
    expect(beds.beds.map((b: { id: number }) => b.id)).not.toContain(unit.bedIds[1]);
    const board = await (await s.charge.get(`/api/board?unit=${unit.code}`)).json();
    expect(board.tiles.map((t: { bedId?: number; bed?: { id: number } }) => t.bedId ?? t.bed?.id)).not.toContain(
      unit.bedIds[1],
    );
    // The patient's record still shows the stay in the retired bed.
    const detail = await (await s.charge.get(`/api/patients/${patient.id}`)).json();
    expect(detail.stays[0].bedId).toBe(unit.bedIds[1]);
    // Reordering lists active beds only.
    const list = await (await s.admin.get('/api/admin/units')).json();
    const mine = list.units.find((u: { code: string }) => u.code === unit.code);
    expect(mine.beds.find((b: { id: number }) => b.id === unit.bedIds[1])).toMatchObject({ active: false });
    const audit = await db('audit_log')
      .where({ action: 'bed.retire', entity_id: String(unit.bedIds[1]) })
      .first();
    expect(typeof audit.after === 'string' ? JSON.parse(audit.after) : audit.after).toMatchObject({
      reason: 'monitor arm broken',
    });
  });
});
