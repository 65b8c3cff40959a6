import { describe, expect, it } from 'vitest';
import { AASM_DESATURATION_PCT } from './constants';
import { desaturationEvents } from './desaturation';
import { ComputationInputError } from './errors';

const T0 = Date.UTC(2025, 0, 1);

/** One sample per second; `dips` set [startSec, lengthSec, spo2] over a steady baseline. */
function series(seconds: number, baseline: number, dips: [number, number, number][]): { at: number; spo2: number }[] {
  return Array.from({ length: seconds }, (_, i) => {
    const dip = dips.find(([s, len]) => i >= s && i < s + len);
    return { at: T0 + i * 1000, spo2: dip ? dip[2] : baseline };
  });
}

describe('desaturation events (AASM scoring manual: ≥ 3 % rule 1A, ≥ 4 % rule 1B; duration ours)', () => {
  it('pins the AASM drops', () => expect(AASM_DESATURATION_PCT).toEqual({ rule1A: 3, rule1B: 4 }));

  it('finds a 3-point drop from a steady baseline with its start, end and nadir', () => {
    const data = series(3601, 96, [
      [600, 30, 93],
      [1800, 20, 90],
    ]);
    const r = desaturationEvents(data);
    expect(r.events).toEqual([
      { start: T0 + 600_000, end: T0 + 630_000, nadir: 93, baseline: 96, drop: 3 },
      { start: T0 + 1_800_000, end: T0 + 1_820_000, nadir: 90, baseline: 96, drop: 6 },
    ]);
    expect(r.monitoredMin).toBe(60);
    expect(r.perHour).toBe(2);
  });

  it('ignores a 2-point drop, and a 3-point drop under rule 1B (4 %)', () => {
    expect(desaturationEvents(series(1200, 96, [[600, 30, 94]])).events).toHaveLength(0);
    expect(desaturationEvents(series(1200, 96, [[600, 30, 93]]), { dropPct: 4 }).events).toHaveLength(0);
    expect(desaturationEvents(series(1200, 96, [[600, 30, 92]]), { dropPct: 4 }).events).toHaveLength(1);
  });

  it('drops events shorter than the minimum duration (setting, 10 s by default)', () => {
    expect(desaturationEvents(series(1200, 96, [[600, 9, 90]])).events).toHaveLength(0);
    expect(desaturationEvents(series(1200, 96, [[600, 10, 90]])).events).toHaveLength(1);
    expect(desaturationEvents(series(1200, 96, [[600, 9, 90]]), { minDurationSec: 5 }).events).toHaveLength(1);
  });

  it('keeps event samples out of the baseline, so back-to-back events are each measured from 96', () => {
    const r = desaturationEvents(
      series(1200, 96, [
        [300, 60, 92],
        [380, 60, 92],
      ]),
    );
    expect(r.events.map((e) => e.baseline)).toEqual([96, 96]);
  });

  it('needs a full baseline window first: a drop in the first 2 min is not scored', () => {
    expect(desaturationEvents(series(600, 96, [[30, 30, 90]])).events).toHaveLength(0);
  });

  it('closes an event at a gap and leaves the gap out of the hours', () => {
    const before = series(400, 96, [[300, 100, 90]]);
    const after = series(200, 96, []).map((p) => ({ ...p, at: p.at + 3_600_000 }));
    const r = desaturationEvents([...before, ...after]);
    expect(r.events).toHaveLength(1);
    expect(r.events[0]!.end).toBe(T0 + 399_000);
    expect(r.monitoredMin).toBeCloseTo((399 + 199) / 60, 10);
  });

  it('empty input: no events and 0 per hour', () => {
    expect(desaturationEvents([])).toEqual({ events: [], perHour: 0, monitoredMin: 0 });
  });

  it('throws on unsorted times and impossible SpO₂', () => {
    expect(() =>
      desaturationEvents([
        { at: T0 + 1000, spo2: 95 },
        { at: T0, spo2: 95 },
      ]),
    ).toThrowError(ComputationInputError);
    expect(() => desaturationEvents([{ at: T0, spo2: Number.NaN }])).toThrowError(ComputationInputError);
    expect(() => desaturationEvents([{ at: T0, spo2: 140 }])).toThrowError(ComputationInputError);
    expect(() => desaturationEvents([], { dropPct: 0 })).toThrowError(ComputationInputError);
  });
});
