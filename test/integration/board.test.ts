import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HttpSession } from '../support/app.ts';
import { createAdmittedPatient, createUnit } from '../support/db.ts';
import { useWard, type FixtureUnit } from '../support/ward.ts';
import { unitBoard } from '../../src/lib/server/board/board.ts';
import { db as appDb, closeDb } from '../../src/lib/server/queries/db.ts';

const {
  db,
  unit,
  other: otherUnit,
  s,
  ids,
} = useWard({
  beds: 8,
  otherBeds: 1,
  people: {
    nurse: ['nurse', 'unit'],
    charge: ['charge', 'unit'],
    otherNurse: ['nurse', 'other'],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  },
});
let smallUnit: FixtureUnit;
const now = Date.now();
const min = 60_000;

async function patientIn(bedId: number, band: [number, number] | null) {
  const order = band
    ? { low: band[0], high: band[1], orderedBy: ids.intensivist, orderedAt: now - 9 * 60 * min }
    : undefined;
  return (await createAdmittedPatient(db, { bedId, since: now - 10 * 60 * min, band: order })).patientId;
}

async function readings(
  patientId: number,
  bedId: number,
  rows: { minsAgo: number; spo2: number; trace?: string; source?: string; fio2?: number; device?: string }[],
) {
  await db('observations').insert(
    rows.map((r) => ({
      patient_id: patientId,
      bed_id: bedId,
      taken_at: new Date(now - r.minsAgo * min),
      source: r.source ?? 'device',
      spo2: r.spo2,
      heart_rate: 90,
      trace: r.trace ?? 'clean',
      fio2: r.fio2 ?? null,
      device: r.device ?? null,
      ...(r.source === 'charted' ? { resp_rate: 18, systolic: 120, temperature: 37, consciousness: 'alert' } : {}),
    })),
  );
}
const span = (
  from: number,
  to: number,
  f: (m: number) => Partial<{ spo2: number; trace: string; fio2: number; device: string }>,
) => Array.from({ length: from - to + 1 }, (_, i) => ({ minsAgo: from - i, spo2: 94, ...f(from - i) }));

beforeAll(async () => {
  smallUnit = await createUnit(db, 1);
  const lone = await patientIn(smallUnit.bedIds[0], [92, 96]);
  await readings(lone, smallUnit.bedIds[0], [{ minsAgo: 5, spo2: 95, source: 'charted' }]);
  const [b1, b2, b3, b4, b5, b6, b7] = unit.bedIds;
  // F-1 below band for 18 min (trusted device readings), obs charted 20 min ago.
  const below = await patientIn(b1, [92, 96]);
  await readings(below, b1, [
    { minsAgo: 20, spo2: 94, source: 'charted', fio2: 0.28, device: 'nasal_cannula' },
    ...span(40, 19, () => ({})),
    ...span(18, 0, () => ({ spo2: 89 })),
  ]);
  // F-2 in band, on time.
  const inBand = await patientIn(b2, [92, 96]);
  await readings(inBand, b2, [
    { minsAgo: 30, spo2: 95, source: 'charted', fio2: 0.21, device: 'room_air' },
    ...span(30, 0, () => ({ spo2: 95 })),
  ]);
  // F-3 poor trace for 20 min: cannot verify.
  const poor = await patientIn(b3, [92, 96]);
  await readings(poor, b3, [
    { minsAgo: 25, spo2: 94, source: 'charted', fio2: 0.28, device: 'nasal_cannula' },
    ...span(20, 0, () => ({ spo2: 78, trace: 'noisy' })),
  ]);
  // F-4 no band ordered.
  const noBand = await patientIn(b4, null);
  await readings(noBand, b4, [{ minsAgo: 10, spo2: 95, source: 'charted', fio2: 0.21, device: 'room_air' }]);
  // F-5 overdue: last charted 2 h ago, device readings in band.
  const overdue = await patientIn(b5, [92, 96]);
  await readings(overdue, b5, [
    { minsAgo: 120, spo2: 94, source: 'charted', fio2: 0.21, device: 'room_air' },
    ...span(10, 0, () => ({})),
  ]);
  // F-6 above band on oxygen for 40 min.
  const above = await patientIn(b6, [88, 92]);
  await readings(above, b6, [
    { minsAgo: 45, spo2: 97, source: 'charted', fio2: 0.35, device: 'simple_mask' },
    ...span(40, 0, () => ({ spo2: 97, fio2: 0.35 })),
  ]);
  // F-7 in band too; F-8 empty.
  const inBand2 = await patientIn(b7, [92, 96]);
  await readings(inBand2, b7, [
    { minsAgo: 10, spo2: 93, source: 'charted', fio2: 0.21, device: 'room_air' },
    ...span(10, 0, () => ({ spo2: 93 })),
  ]);
});
afterAll(async () => {
  await closeDb();
});

describe('GET /api/board', () => {
  it('gives each bed its state, duration and sort position by concern', async () => {
    const res = await s.charge.get(`/api/board?unit=${unit.code}`);
    expect(res.status).toBe(200);
    const board = await res.json();
    const order = board.tiles.map((t: { bedLabel: string }) => t.bedLabel);
    expect(order).toEqual(['F-1', 'F-3', 'F-4', 'F-5', 'F-6', 'F-2', 'F-7', 'F-8']);
    const by = Object.fromEntries(board.tiles.map((t: { bedLabel: string }) => [t.bedLabel, t]));
    expect(by['F-1'].state).toMatchObject({ name: 'below', sinceMin: 18 });
    expect(by['F-1'].concern.reason).toBe('Below band 18 min');
    expect(by['F-3'].concern.key).toBe('cannot_verify');
    expect(by['F-3'].concerns.belowBand).toBeNull();
    expect(by['F-4'].concern.reason).toBe('No band ordered');
    expect(by['F-5'].overdue).toBe(true);
    expect(by['F-5'].minutesSinceCharted).toBe(120);
    expect(by['F-6'].concern.key).toBe('above_on_oxygen');
    expect(by['F-2'].state.name).toBe('in');
    // NEWS2 (RCP 2017): SpO₂ 95 % scores 1 on Scale 1, everything else 0 → 1, low.
    expect(by['F-2'].news2).toEqual({ total: 1, response: 'low', scale: 1 });
    expect(by['F-8'].patient).toBeNull();
    expect(Date.parse(board.generatedAt)).toBeGreaterThan(now - 60_000);
    expect(board.unit).toMatchObject({ code: unit.code, timeZone: 'Europe/London' });
  });

  it('lets a nurse see their own unit only; outreach and intensivists every unit; admin none; 401 signed out', async () => {
    expect((await s.nurse.get(`/api/board?unit=${unit.code}`)).status).toBe(200);
    expect((await s.nurse.get('/api/board')).status).toBe(200);
    expect((await s.otherNurse.get(`/api/board?unit=${unit.code}`)).status).toBe(403);
    expect((await s.outreach.get(`/api/board?unit=${unit.code}`)).status).toBe(200);
    expect((await s.intensivist.get(`/api/board?unit=${otherUnit.code}`)).status).toBe(200);
    expect((await s.admin.get(`/api/board?unit=${unit.code}`)).status).toBe(403);
    expect((await new HttpSession().get(`/api/board?unit=${unit.code}`)).status).toBe(401);
  });

  it('lets the charge nurse assign a nurse to a bed, and shows it on the tile', async () => {
    expect((await s.nurse.put(`/api/beds/${unit.bedIds[0]}/assignment`, { nurseId: ids.nurse })).status).toBe(403);
    expect((await s.charge.put(`/api/beds/${unit.bedIds[0]}/assignment`, { nurseId: ids.otherNurse })).status).toBe(
      400,
    );
    expect((await s.charge.put(`/api/beds/${otherUnit.bedIds[0]}/assignment`, { nurseId: ids.nurse })).status).toBe(
      403,
    );
    const res = await s.charge.put(`/api/beds/${unit.bedIds[0]}/assignment`, { nurseId: ids.nurse });
    expect(res.status).toBe(200);
    const board = await (await s.nurse.get(`/api/board?unit=${unit.code}`)).json();
    const tile = board.tiles.find((t: { bedLabel: string }) => t.bedLabel === 'F-1');
    expect(tile.nurse).toEqual({ id: ids.nurse, name: 'Fixture nurse' });
    expect(
      await db('audit_log')
        .where({ entity: 'bed', entity_id: String(unit.bedIds[0]), action: 'bed.assign' })
        .first(),
    ).toBeTruthy();
  });

  it('reads a unit in the same number of queries whatever the bed count', async () => {
    const count = async (code: string) => {
      let n = 0;
      const onQuery = () => {
        n += 1;
      };
      appDb().on('query', onQuery);
      await unitBoard(
        { id: ids.intensivist, email: '', name: '', role: 'intensivist', unitId: null, unitCode: null, unitName: null },
        code,
      );
      appDb().off('query', onQuery);
      return n;
    };
    const big = await count(unit.code);
    const small = await count(smallUnit.code);
    expect(big).toBe(small);
    expect(big).toBeLessThanOrEqual(8);
  });
});
