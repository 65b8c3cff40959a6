import { describe, expect, it } from 'vitest';
import { nearest, stepAt, valuesAt } from './chart-values.ts';
import type { SeriesResponse } from './api-types.ts';

const T = Date.UTC(2026, 11, 2, 6, 0);
const MIN = 60_000;

describe('values at a time on the bed chart', () => {
  it('picks the nearest point within reach, and nothing further away', () => {
    const pts = [{ t: T }, { t: T + 10 * MIN }, { t: T + 30 * MIN }];
    expect(nearest(pts, T + 4 * MIN, 5 * MIN)).toEqual({ t: T });
    expect(nearest(pts, T + 6 * MIN, 5 * MIN)).toEqual({ t: T + 10 * MIN });
    expect(nearest(pts, T + 20 * MIN, 5 * MIN)).toBeNull();
  });

  it('reads the FiO₂ step and the band in force, with SpO₂ and heart rate', () => {
    const s = {
      bucketMs: 0,
      from: T,
      to: T + 60 * MIN,
      spo2: [{ t: T + 5 * MIN, v: 91, trusted: true, source: 'device' }],
      heartRate: [{ t: T + 5 * MIN, v: 88 }],
      fio2: [
        { t: T, v: 0.35, device: 'simple_mask', flowLpm: 6, estimated: false },
        { t: T + 20 * MIN, v: 0.5, device: 'high_flow_nasal', flowLpm: 40, estimated: false },
      ],
      bands: [
        { from: T, to: T + 30 * MIN, low: 92, high: 96 },
        { from: T + 30 * MIN, to: T + 60 * MIN, low: 88, high: 92 },
      ],
    } as unknown as SeriesResponse;
    const v = valuesAt(s, T + 6 * MIN);
    expect(v.spo2?.v).toBe(91);
    expect(v.heartRate?.v).toBe(88);
    expect(v.fio2).toMatchObject({ v: 0.35, device: 'simple_mask' });
    expect(v.band).toMatchObject({ low: 92 });
    expect(valuesAt(s, T + 45 * MIN)).toMatchObject({ spo2: null, fio2: { v: 0.5 }, band: { low: 88 } });
    expect(stepAt(s.fio2, T - 1)).toBeNull();
  });
});
