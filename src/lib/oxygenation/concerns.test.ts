import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bandState, detectConcerns } from './concerns';
import { bandCompliance } from './compliance';
import { ComputationInputError } from './errors';
import { isTrusted } from './trust';
import type { Reading, ReadingSource, TraceQuality } from './types';

const MIN = 60_000;
const T0 = Date.UTC(2025, 0, 1);
const BAND = { low: 92, high: 96 };

function charted(min: number, spo2: number | null, extra: Partial<Reading> = {}): Reading {
  return { at: T0 + min * MIN, spo2, trace: 'clean', source: 'charted', ...extra };
}
function device(sec: number, spo2: number | null, extra: Partial<Reading> = {}): Reading {
  return { at: T0 + sec * 1000, spo2, trace: 'clean', source: 'device', ...extra };
}
/** One device reading per second from `fromSec` for `count` seconds. */
function deviceRun(fromSec: number, count: number, spo2: number, extra: Partial<Reading> = {}): Reading[] {
  return Array.from({ length: count }, (_, i) => device(fromSec + i, spo2, extra));
}
const at = (min: number) => T0 + min * MIN;

describe('sustained below band — charted rule (unit setting: 2 consecutive)', () => {
  it('two consecutive trusted charted readings below band raise a standard concern', () => {
    const readings = [charted(0, 95), charted(60, 91), charted(120, 90)];
    const c = detectConcerns(readings, BAND, at(130)).belowBand;
    expect(c).not.toBeNull();
    expect(c).toMatchObject({
      severity: 'standard',
      rule: 'charted_consecutive',
      runStart: at(60),
      runEnd: at(120),
      nadir: 90,
      sinceMin: 70,
      metAt: at(120),
      chartedCount: 2,
    });
    expect(c!.firstReading).toBe(readings[1]);
    expect(c!.lastReading).toBe(readings[2]);
  });

  it('one reading below band is not enough; a trusted in-band reading between resets the count', () => {
    expect(detectConcerns([charted(0, 91)], BAND, at(10)).belowBand).toBeNull();
    expect(detectConcerns([charted(0, 91), charted(30, 93), charted(60, 91)], BAND, at(70)).belowBand).toBeNull();
  });

  it('an untrusted reading between neither breaks nor extends the run', () => {
    const c = detectConcerns(
      [charted(0, 91), charted(30, 97, { trace: 'noisy' }), charted(60, 90)],
      BAND,
      at(70),
    ).belowBand;
    expect(c?.chartedCount).toBe(2);
    expect(c?.runStart).toBe(at(0));
  });

  it('honours a unit setting of 3 consecutive readings', () => {
    const readings = [charted(0, 91), charted(30, 91)];
    expect(detectConcerns(readings, BAND, at(40), { consecutiveCharted: 3 }).belowBand).toBeNull();
    expect(
      detectConcerns([...readings, charted(60, 91)], BAND, at(70), { consecutiveCharted: 3 }).belowBand,
    ).not.toBeNull();
  });
});

describe('sustained below band — device dwell (unit setting: 5 min)', () => {
  it('trusted device readings below band for under 5 min raise nothing; for 5 min a concern', () => {
    expect(detectConcerns(deviceRun(0, 300, 90), BAND, T0 + 300_000).belowBand).toBeNull(); // 0…299 s spans 4 min 59 s
    const c = detectConcerns(deviceRun(0, 301, 90), BAND, T0 + 301_000).belowBand;
    expect(c).toMatchObject({
      rule: 'device_dwell',
      runStart: T0,
      runEnd: T0 + 300_000,
      metAt: T0 + 300_000,
      severity: 'standard',
    });
  });

  it('a single trusted in-band device reading inside the dwell restarts it', () => {
    const readings = [...deviceRun(0, 200, 90), device(200, 93), ...deviceRun(201, 200, 90)];
    expect(detectConcerns(readings, BAND, T0 + 401_000).belowBand).toBeNull();
  });

  it('untrusted in-band readings inside the dwell do not restart it', () => {
    const readings = [
      ...deviceRun(0, 200, 90),
      ...deviceRun(200, 10, 95, { trace: 'noisy' }),
      ...deviceRun(210, 100, 90),
    ];
    expect(detectConcerns(readings, BAND, T0 + 310_000).belowBand?.rule).toBe('device_dwell');
  });
});

describe('sustained below band — severity (unit settings: margin 5 points, floor 85 %)', () => {
  it('urgent when a reading is 5 or more points below the lower limit', () => {
    expect(detectConcerns([charted(0, 91), charted(30, 87)], BAND, at(31)).belowBand?.severity).toBe('urgent');
    expect(detectConcerns([charted(0, 91), charted(30, 88)], BAND, at(31)).belowBand?.severity).toBe('standard');
  });

  it('urgent when a reading is under 85 %, even within the margin', () => {
    const low = { low: 88, high: 92 };
    const c = detectConcerns([charted(0, 87), charted(30, 84)], low, at(31)).belowBand;
    expect(c?.severity).toBe('urgent');
    expect(c?.urgentReasons).toHaveLength(1);
    expect(detectConcerns([charted(0, 87), charted(30, 85)], low, at(31)).belowBand?.severity).toBe('standard');
  });

  it('an untrusted very low reading does not make a run urgent', () => {
    const readings = [charted(0, 91), charted(10, 60, { trace: 'noisy' }), charted(30, 90)];
    expect(detectConcerns(readings, BAND, at(31)).belowBand?.severity).toBe('standard');
  });
});

describe('cannot verify (setting: 15 min of untrusted readings only)', () => {
  it('raises a probe check after 15 min of untrusted readings, and never a below-band concern from them', () => {
    const readings = [charted(0, 95), ...deviceRun(600, 1000, 70, { trace: 'noisy' })];
    const at14 = detectConcerns(readings, BAND, T0 + 600_000 + 14 * MIN);
    expect(at14.cannotVerify).toBeNull();
    const at16 = detectConcerns(readings, BAND, T0 + 600_000 + 16 * MIN);
    expect(at16.cannotVerify).toMatchObject({ since: T0 + 600_000, lastTrustedAt: T0, sinceMin: 16 });
    expect(at16.belowBand).toBeNull();
  });

  it('a trusted reading ends the streak; works with no band', () => {
    const readings = [device(0, null, { trace: 'absent' }), device(20 * 60, 95)];
    expect(detectConcerns(readings, null, T0 + 21 * MIN).cannotVerify).toBeNull();
    expect(
      detectConcerns([device(0, null, { trace: 'absent' })], null, T0 + 20 * MIN).cannotVerify?.lastTrustedAt,
    ).toBeNull();
  });
});

describe('above band on oxygen (setting: 30 min)', () => {
  it('trusted readings above band on FiO₂ > 0.21 for 30 min raise a wean prompt', () => {
    const readings = [charted(0, 99, { fio2: 0.4, device: 'simple_mask' }), charted(15, 98), charted(30, 99)];
    const c = detectConcerns(readings, BAND, at(35)).aboveOnOxygen;
    expect(c).toMatchObject({ since: at(0), spanMin: 30, fio2: 0.4, device: 'simple_mask' });
    expect(detectConcerns(readings.slice(0, 2), BAND, at(35)).aboveOnOxygen).toBeNull();
  });

  it('not on room air, and an in-band reading resets it', () => {
    const air = [charted(0, 99, { fio2: 0.21, device: 'room_air' }), charted(40, 99)];
    expect(detectConcerns(air, BAND, at(41)).aboveOnOxygen).toBeNull();
    const reset = [charted(0, 99, { fio2: 0.4 }), charted(20, 95), charted(40, 99)];
    expect(detectConcerns(reset, BAND, at(41)).aboveOnOxygen).toBeNull();
  });

  it('counts a non-room-air device as oxygen when FiO₂ is not charted', () => {
    const readings = [charted(0, 99, { device: 'nasal_cannula' }), charted(30, 99)];
    expect(detectConcerns(readings, BAND, at(31)).aboveOnOxygen?.fio2).toBeNull();
    expect(detectConcerns(readings, BAND, at(31)).aboveOnOxygen).not.toBeNull();
  });
});

describe('detectConcerns input handling', () => {
  it('ignores readings after now', () => {
    expect(detectConcerns([charted(0, 91), charted(60, 91)], BAND, at(30)).belowBand).toBeNull();
  });

  it('throws on unsorted readings, FiO₂ in percent, bad band or settings', () => {
    expect(() => detectConcerns([charted(10, 91), charted(0, 91)], BAND, at(30))).toThrowError(ComputationInputError);
    expect(() => detectConcerns([charted(0, 91, { fio2: 40 })], BAND, at(30))).toThrowError(ComputationInputError);
    expect(() => detectConcerns([], { low: 96, high: 92 }, at(30))).toThrowError(ComputationInputError);
    expect(() => detectConcerns([], BAND, Number.NaN)).toThrowError(ComputationInputError);
    expect(() => detectConcerns([], BAND, at(0), { consecutiveCharted: 1.5 })).toThrowError(ComputationInputError);
  });

  it('returns all nulls for no readings', () => {
    expect(detectConcerns([], BAND, at(0))).toEqual({ belowBand: null, cannotVerify: null, aboveOnOxygen: null });
  });
});

describe('detectConcerns properties', () => {
  const readingsArb = fc
    .array(
      fc.record({
        sec: fc.integer({ min: 0, max: 4 * 3600 }),
        spo2: fc.option(fc.integer({ min: 40, max: 100 }), { freq: 8 }),
        trace: fc.constantFrom<TraceQuality>('clean', 'weak', 'noisy', 'absent'),
        source: fc.constantFrom<ReadingSource>('charted', 'device', 'import'),
        perfusionIndex: fc.option(fc.double({ min: 0, max: 5, noNaN: true })),
      }),
      { maxLength: 80 },
    )
    .map((rows) =>
      rows
        .sort((a, b) => a.sec - b.sec)
        .map(
          (r): Reading => ({
            at: T0 + r.sec * 1000,
            spo2: r.spo2,
            trace: r.trace,
            source: r.source,
            perfusionIndex: r.perfusionIndex,
          }),
        ),
    );

  it('a poor-trace device reading between two low charted obs does not end the charted run (found by the property below)', () => {
    const t = 1_735_691_917_000;
    const readings: Reading[] = [
      { at: t, spo2: 49, trace: 'weak', source: 'charted', perfusionIndex: null },
      { at: t + 2_393_000, spo2: null, trace: 'weak', source: 'device', perfusionIndex: 1e-118 },
      { at: t + 3_130_000, spo2: 88, trace: 'weak', source: 'charted', perfusionIndex: null },
    ];
    const withPoorTrace = detectConcerns(readings, BAND, t + 3_600_000).belowBand;
    const without = detectConcerns([readings[0]!, readings[2]!], BAND, t + 3_600_000).belowBand;
    expect(without).not.toBeNull();
    expect(withPoorTrace).toMatchObject({
      severity: without!.severity,
      rule: without!.rule,
      runStart: without!.runStart,
    });
  });

  it('untrusted readings never cause a below-band escalation: removing them never removes a concern', () => {
    fc.assert(
      fc.property(readingsArb, (readings) => {
        const now = T0 + 5 * 3600 * 1000;
        const trustedOnly = readings.filter((r) => isTrusted(r));
        const all = detectConcerns(readings, BAND, now).belowBand;
        const withoutUntrusted = detectConcerns(trustedOnly, BAND, now).belowBand;
        if (withoutUntrusted === null) expect(all).toBeNull();
        else
          expect(all).toMatchObject({
            severity: withoutUntrusted.severity,
            rule: withoutUntrusted.rule,
            runStart: withoutUntrusted.runStart,
          });
      }),
    );
  });

  it('with every trusted reading at or above the lower limit, no below-band concern whatever the untrusted ones show', () => {
    fc.assert(
      fc.property(readingsArb, (readings) => {
        const lifted = readings.map((r) => (isTrusted(r) ? { ...r, spo2: Math.max(r.spo2 as number, BAND.low) } : r));
        expect(detectConcerns(lifted, BAND, T0 + 5 * 3600 * 1000).belowBand).toBeNull();
      }),
    );
  });
});

describe('bandState (board tile)', () => {
  it('below band since the first reading of the run ("below band 18 min")', () => {
    const s = bandState([charted(0, 95), charted(42, 90), charted(50, 89)], BAND, at(60));
    expect(s).toMatchObject({ state: 'below', since: at(42), sinceMin: 18 });
  });

  it('untrusted since the first of the streak; untrusted readings do not break a run', () => {
    expect(bandState([charted(0, 90), charted(10, 95, { trace: 'noisy' })], BAND, at(20))).toMatchObject({
      state: 'untrusted',
      since: at(10),
    });
    expect(
      bandState([charted(0, 90), charted(10, 95, { trace: 'noisy' }), charted(20, 91)], BAND, at(20)),
    ).toMatchObject({ state: 'below', since: at(0) });
  });

  it('no reading once the carry-forward has run out, since when it ran out', () => {
    expect(bandState([device(0, 95)], BAND, T0 + 5 * MIN)).toMatchObject({
      state: 'no_reading',
      since: T0 + 2 * MIN,
      sinceMin: 3,
    });
    expect(bandState([], BAND, at(0))).toMatchObject({ state: 'no_reading', since: null });
  });

  it('no band, in band and above band on oxygen', () => {
    expect(bandState([charted(0, 95)], null, at(1)).state).toBe('no_band');
    expect(bandState([charted(0, 95)], BAND, at(1)).state).toBe('in');
    expect(bandState([charted(0, 99, { fio2: 0.35 })], BAND, at(40))).toMatchObject({
      state: 'above',
      since: at(0),
      onOxygen: true,
    });
  });

  it('a gap with no reading starts a new run', () => {
    expect(bandState([device(0, 90), device(600, 90)], BAND, T0 + 601_000)).toMatchObject({
      state: 'below',
      since: T0 + 600_000,
    });
  });
});

describe('one rule for runs across gaps (issue 10 point 3): escalation dwell, board state and compliance agree', () => {
  // A device reading stands for at most 2 min (compliance default); past that is "no reading".
  const figures = (readings: Reading[], now: number) => ({
    concerns: detectConcerns(readings, BAND, now),
    state: bandState(readings, BAND, now),
    compliance: bandCompliance(readings, [{ from: T0, low: BAND.low, high: BAND.high }], { from: T0, to: now }),
  });

  it('two trusted below-band device readings 5 min apart with nothing between: no dwell, the state restarts at the gap', () => {
    const readings = [device(0, 88), device(300, 88)];
    const { concerns, state, compliance } = figures(readings, T0 + 301_000);
    expect(concerns.belowBand).toBeNull();
    expect(state.state).toBe('below');
    expect(state.since).toBe(T0 + 300_000); // not T0: the gap broke the run
    expect(compliance.noReadingMin).toBeCloseTo(3, 5); // 2–5 min had no reading
  });

  it('a 4 h gap between below-band runs starts the run afresh', () => {
    const readings = [...deviceRun(0, 301, 88), ...deviceRun(4 * 3600, 3, 88)]; // 5 min of readings, 4 h gap, 3 more
    const before = detectConcerns(readings.slice(0, 301), BAND, T0 + 300_000);
    expect(before.belowBand?.runStart).toBe(T0);
    const { concerns, state } = figures(readings, T0 + 4 * 3_600_000 + 20_000);
    expect(concerns.belowBand).toBeNull(); // 10 s of readings after the gap: no dwell yet
    expect(state.since).toBe(T0 + 4 * 3_600_000);
  });

  it('the dwell edge: readings exactly 2 min apart carry the run; 2 min 1 s apart do not', () => {
    const every = (stepSec: number) => [0, 1, 2, 3].map((k) => device(k * stepSec, 88));
    const carried = figures(every(120), T0 + 360_000 + 1);
    expect(carried.concerns.belowBand).toMatchObject({ rule: 'device_dwell', runStart: T0, runEnd: T0 + 360_000 });
    expect(carried.state.since).toBe(T0);
    const broken = figures(every(121), T0 + 363_000 + 1);
    expect(broken.concerns.belowBand).toBeNull();
    expect(broken.state.since).toBe(T0 + 363_000);
    // Compliance: each reading counts for its 2 min at most; the extra second a step is "no reading".
    expect(broken.compliance.noReadingMin).toBeCloseTo(3 / 60, 5);
  });

  it('charted obs stand for 75 min: two charted obs 20 min apart are one run, as before', () => {
    const c = detectConcerns([charted(0, 89), charted(20, 88)], BAND, at(21));
    expect(c.belowBand?.rule).toBe('charted_consecutive');
  });
});
