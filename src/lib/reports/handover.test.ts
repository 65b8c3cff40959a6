import { describe, expect, it } from 'vitest';
import type { Reading } from '~/lib/oxygenation/index.ts';
import { lowestTrusted, news2At, oxygenCourse } from './handover.ts';

const r = (at: number, spo2: number | null, extra: Partial<Reading> = {}): Reading => ({
  at,
  spo2,
  trace: 'clean',
  source: 'device',
  ...extra,
});

describe('lowestTrusted', () => {
  it('skips untrusted readings and those outside the window', () => {
    const rs = [r(0, 80), r(10, 91), r(20, 85, { trace: 'noisy' }), r(30, 89), r(40, 89), r(50, 70)];
    expect(lowestTrusted(rs, 5, 50)).toEqual({ spo2: 89, at: 30 });
  });
});

describe('oxygenCourse', () => {
  it('gives the state at the start, now, and the changes between', () => {
    const rs = [
      r(0, 95, { device: 'nasal_cannula', fio2: 0.28 }),
      r(20, 95, { device: 'nasal_cannula', fio2: 0.28 }),
      r(30, 94, { device: 'simple_mask', fio2: 0.4 }),
      r(40, 94),
    ];
    const c = oxygenCourse(rs, 10, 100);
    expect(c.atStart).toMatchObject({ device: 'nasal_cannula', fio2: 0.28 });
    expect(c.now).toMatchObject({ device: 'simple_mask', fio2: 0.4 });
    expect(c.changes.map((x) => x.at)).toEqual([30]);
  });
});

describe('news2At', () => {
  it('scores the newest charted set at or before the time (RCP NEWS2 2017 chart: all parameters in the 0 row)', () => {
    const set = {
      at: 100,
      spo2: 97,
      heartRate: 70,
      respRate: 16,
      fio2: 0.21,
      fio2Estimated: false,
      systolic: 120,
      temperature: 37,
      consciousness: 'alert' as const,
      device: 'room_air' as const,
    };
    expect(news2At([set], 50, 1)).toBeNull();
    expect(news2At([set], 100, 1)).toMatchObject({ total: 0, complete: true, at: 100 });
    // On oxygen scores 2 (RCP NEWS2 2017, "air or oxygen" row).
    expect(news2At([{ ...set, device: 'nasal_cannula' }], 200, 1)?.total).toBe(2);
  });
});
