/**
 * Issue 10 points 1–3 against the real MariaDB and the running app (its sweep runs every second in
 * tests): one rule for runs across gaps, silence after below-band readings, and tiles that say how
 * old their values are.
 */
import { describe, expect, it } from 'vitest';
import { createAdmittedPatient } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s, ids } = useWard({
  beds: 3,
  people: { charge: ['charge', 'unit'], intensivist: ['intensivist', null] },
});
const min = 60_000;

async function patientWithDeviceReadings(bedIndex: number, secondsAgo: number[], spo2 = 88) {
  const now = Date.now();
  const bedId = unit.bedIds[bedIndex]!;
  const { patientId: id } = await createAdmittedPatient(db, {
    bedId,
    since: now - 6 * 60 * min,
    band: { low: 92, high: 96, orderedBy: ids.intensivist, orderedAt: now - 5 * 60 * min },
  });
  await db('observations').insert(
    secondsAgo.map((sec) => ({
      patient_id: id,
      bed_id: bedId,
      taken_at: new Date(now - sec * 1000),
      source: 'device',
      spo2,
      heart_rate: 96,
      trace: 'clean',
    })),
  );
  return id;
}
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const tileOf = async (label: string) =>
  (
    (await (await s.charge.get(`/api/board?unit=${unit.code}`)).json()).tiles as {
      bedLabel: string;
      state: Record<string, unknown>;
      monitor: Record<string, unknown> | null;
      concern: { reason: string };
      latest: Record<string, unknown>;
    }[]
  ).find((t) => t.bedLabel === label)!;

describe("time on the board and in the escalations (real database, the app's sweep)", () => {
  it('two trusted below-band device readings 5 min apart with nothing between: no escalation, and the board agrees', async () => {
    const p = await patientWithDeviceReadings(0, [360, 60]); // 6 min and 1 min ago
    await sleep(3_000); // the sweep (every second in tests) has judged the patient
    expect(await db('escalations').where({ patient_id: p })).toHaveLength(0);
    const tile = await tileOf('F-1');
    expect(tile.state).toMatchObject({ name: 'below', sinceMin: 1 }); // restarted at the gap, not 6 min
    expect(tile.latest).toMatchObject({ source: 'device', trusted: true });
    // Band compliance counts each device reading for 2 min at most: about 3 min below band (2 + the last minute), not 6.
    const series = await (await s.charge.get(`/api/patients/${p}/series?hours=6`)).json();
    expect(series.derived.compliance.belowMin).toBeGreaterThanOrEqual(2.8);
    expect(series.derived.compliance.belowMin).toBeLessThanOrEqual(3.4);
  });

  it('a monitor silent right after trusted below-band readings raises a bedside probe check; the tile says since when', async () => {
    const p = await patientWithDeviceReadings(1, [360, 330, 300, 270, 240]); // below band 6–4 min ago, then nothing
    let probe: { kind: string; state: string } | undefined;
    for (let i = 0; i < 20 && !probe; i++) {
      await sleep(500);
      probe = await db('escalations').where({ patient_id: p, kind: 'probe_check' }).first();
    }
    expect(probe).toMatchObject({ kind: 'probe_check', state: 'raised' });
    expect(await db('escalations').where({ patient_id: p, kind: 'below_band' })).toHaveLength(0); // 2 min of readings: no dwell
    const tile = await tileOf('F-2');
    expect(tile.monitor).toMatchObject({ silent: true });
    expect(tile.state).toMatchObject({ name: 'no_reading', was: 'below' });
    expect(tile.concern.reason).toMatch(
      /^Probe check: monitor silent since \d\d:\d\d — check the probe at the bedside$/,
    );
  });
});
