import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bandCompliance } from './compliance';
import { ComputationInputError } from './errors';
import { isTrusted } from './trust';
import type { BandOrder, Reading, ReadingSource, TraceQuality } from './types';

const MIN = 60_000;
const T0 = Date.UTC(2025, 0, 1); // any fixed epoch; the computations never read the clock

function reading(min: number, spo2: number | null, extra: Partial<Reading> = {}): Reading {
  return { at: T0 + min * MIN, spo2, trace: 'clean', source: 'charted', ...extra };
}
const band = (fromMin: number, low: number, high: number): BandOrder => ({ from: T0 + fromMin * MIN, low, high });
const win = (fromMin: number, toMin: number) => ({ from: T0 + fromMin * MIN, to: T0 + toMin * MIN });

function totalOf(r: ReturnType<typeof bandCompliance>): number {
  return r.inBandMin + r.belowMin + r.aboveMin + r.untrustedMin + r.noReadingMin + r.noBandMin;
}

describe('isTrusted', () => {
  it('trusts clean and weak traces, not noisy or absent', () => {
    const trusted = (trace: TraceQuality) => isTrusted(reading(0, 95, { trace }));
    expect([trusted('clean'), trusted('weak'), trusted('noisy'), trusted('absent')]).toEqual([
      true,
      true,
      false,
      false,
    ]);
  });

  it('distrusts a perfusion index under 0.4 % (common practice, no standard; a setting)', () => {
    expect(isTrusted(reading(0, 95, { perfusionIndex: 0.39 }))).toBe(false);
    expect(isTrusted(reading(0, 95, { perfusionIndex: 0.4 }))).toBe(true);
    expect(isTrusted(reading(0, 95, { perfusionIndex: null }))).toBe(true);
    expect(isTrusted(reading(0, 95, { perfusionIndex: 0.3 }), { minPerfusionIndexPct: 0.2 })).toBe(true);
  });

  it('does not trust a row with no SpO₂ value', () => {
    expect(isTrusted(reading(0, null))).toBe(false);
  });

  it('throws on an unknown trace or impossible SpO₂', () => {
    expect(() => isTrusted(reading(0, 95, { trace: 'fuzzy' as never }))).toThrowError(ComputationInputError);
    expect(() => isTrusted(reading(0, 101))).toThrowError(ComputationInputError);
    expect(() => isTrusted(reading(0, 95, { perfusionIndex: -1 }))).toThrowError(ComputationInputError);
  });
});

describe('bandCompliance', () => {
  it('carries charted readings forward until the next reading or 75 min, then counts no reading', () => {
    const r = bandCompliance([reading(0, 95), reading(60, 90)], [band(0, 92, 96)], win(0, 180));
    expect(r.inBandMin).toBe(60);
    expect(r.belowMin).toBe(75);
    expect(r.noReadingMin).toBe(45);
    // Burden = (92 − 90) × 75 min.
    expect(r.burdenPctMin).toBe(150);
    expect(r.windowMin).toBe(180);
    expect(totalOf(r)).toBe(180);
    expect(r.trustedReadings).toBe(2);
    expect(r.timeInBandPct).toBeCloseTo((60 / 135) * 100, 10);
  });

  it('device readings carry forward 2 min', () => {
    const r = bandCompliance([reading(0, 97, { source: 'device' })], [band(0, 92, 96)], win(0, 10));
    expect(r.aboveMin).toBe(2);
    expect(r.noReadingMin).toBe(8);
  });

  it('splits a reading’s span where the order changes', () => {
    // 90 % is below 92–96 for the first 30 min, then inside 88–92.
    const r = bandCompliance([reading(0, 90)], [band(0, 92, 96), band(30, 88, 92)], win(0, 60));
    expect(r.belowMin).toBe(30);
    expect(r.inBandMin).toBe(30);
    expect(r.burdenPctMin).toBe(60);
  });

  it('counts time before the first order as no band, whatever the readings', () => {
    const r = bandCompliance([reading(0, 80)], [band(30, 92, 96)], win(0, 60));
    expect(r.noBandMin).toBe(30);
    expect(r.belowMin).toBe(30);
    expect(r.burdenPctMin).toBe(12 * 30);
    expect(bandCompliance([reading(0, 80)], [], win(0, 60)).noBandMin).toBe(60);
  });

  it('counts untrusted readings as untrusted time, never below band', () => {
    const r = bandCompliance(
      [
        reading(0, 70, { trace: 'noisy' }),
        reading(30, 70, { perfusionIndex: 0.2 }),
        reading(45, null, { trace: 'absent' }),
      ],
      [band(0, 92, 96)],
      win(0, 60),
    );
    expect(r.untrustedMin).toBe(60);
    expect(r.belowMin).toBe(0);
    expect(r.burdenPctMin).toBe(0);
    expect(r.untrustedReadings).toBe(3);
  });

  it('lets a reading before the window carry into it, without counting it', () => {
    const r = bandCompliance([reading(-10, 94)], [band(-60, 92, 96)], win(0, 120));
    expect(r.inBandMin).toBe(65);
    expect(r.noReadingMin).toBe(55);
    expect(r.trustedReadings).toBe(0);
  });

  it('gives a window of no reading for no readings, and zeros for an empty window', () => {
    expect(bandCompliance([], [band(0, 92, 96)], win(0, 60)).noReadingMin).toBe(60);
    const empty = bandCompliance([reading(0, 95)], [band(0, 92, 96)], win(10, 10));
    expect(totalOf(empty)).toBe(0);
    expect(empty.timeInBandPct).toBeNull();
  });

  it('honours per-source gap settings', () => {
    const r = bandCompliance([reading(0, 95)], [band(0, 92, 96)], win(0, 60), { chartedMaxGapMin: 20 });
    expect(r.inBandMin).toBe(20);
  });

  describe('bad input', () => {
    const orders = [band(0, 92, 96)];
    it.each([
      ['unsorted times', [reading(10, 95), reading(5, 95)], 'readings[1].at'],
      ['NaN time', [reading(Number.NaN, 95)], 'readings[0].at'],
      ['infinite time', [{ ...reading(0, 95), at: Infinity }], 'readings[0].at'],
      ['SpO₂ over 100', [reading(0, 101)], 'readings[0].spo2'],
      ['negative SpO₂', [reading(0, -3)], 'readings[0].spo2'],
      ['NaN SpO₂', [reading(0, Number.NaN)], 'readings[0].spo2'],
      ['unknown source', [reading(0, 95, { source: 'fax' as ReadingSource })], 'readings[0].source'],
    ])('%s throws naming %s', (_label, readings, field) => {
      expect(() => bandCompliance(readings as Reading[], orders, win(0, 60))).toThrowError(
        expect.objectContaining({ name: 'ComputationInputError', field }),
      );
    });

    it('refuses unsorted or impossible orders, a backwards window and bad settings', () => {
      expect(() => bandCompliance([], [band(10, 92, 96), band(0, 92, 96)], win(0, 60))).toThrowError(
        ComputationInputError,
      );
      expect(() => bandCompliance([], [band(0, 96, 92)], win(0, 60))).toThrowError(ComputationInputError);
      expect(() => bandCompliance([], [band(0, 92, 101)], win(0, 60))).toThrowError(ComputationInputError);
      expect(() => bandCompliance([], orders, win(60, 0))).toThrowError(ComputationInputError);
      expect(() => bandCompliance([], orders, win(0, 60), { deviceMaxGapMin: -1 })).toThrowError(ComputationInputError);
    });
  });
});

// ── Properties ──────────────────────────────────────────────────────────────────────────────
const traceArb = fc.constantFrom<TraceQuality>('clean', 'weak', 'noisy', 'absent');
const sourceArb = fc.constantFrom<ReadingSource>('charted', 'device', 'import');
const readingsArb = (spo2: fc.Arbitrary<number | null>) =>
  fc
    .array(
      fc.record({
        offsetMin: fc.integer({ min: -120, max: 600 }),
        spo2,
        trace: traceArb,
        source: sourceArb,
        perfusionIndex: fc.option(fc.double({ min: 0, max: 10, noNaN: true })),
      }),
      { maxLength: 60 },
    )
    .map((rows) =>
      rows
        .sort((a, b) => a.offsetMin - b.offsetMin)
        .map((r) => ({
          at: T0 + r.offsetMin * MIN,
          spo2: r.spo2,
          trace: r.trace,
          source: r.source,
          perfusionIndex: r.perfusionIndex,
        })),
    );
const ordersArb = fc
  .array(
    fc.record({
      offsetMin: fc.integer({ min: -60, max: 600 }),
      low: fc.integer({ min: 80, max: 92 }),
      width: fc.integer({ min: 0, max: 8 }),
    }),
    {
      maxLength: 5,
    },
  )
  .map((os) =>
    os
      .sort((a, b) => a.offsetMin - b.offsetMin)
      .map((o) => ({ from: T0 + o.offsetMin * MIN, low: o.low, high: o.low + o.width })),
  );
const windowArb = fc
  .tuple(fc.integer({ min: -60, max: 600 }), fc.integer({ min: 0, max: 600 }))
  .map(([start, length]) => ({ from: T0 + start * MIN, to: T0 + (start + length) * MIN }));

describe('bandCompliance properties', () => {
  it('the minute totals add up to the window', () => {
    fc.assert(
      fc.property(
        readingsArb(fc.option(fc.integer({ min: 50, max: 100 }))),
        ordersArb,
        windowArb,
        (readings, orders, window) => {
          const r = bandCompliance(readings, orders, window);
          expect(totalOf(r)).toBeCloseTo(r.windowMin, 6);
          for (const v of [r.inBandMin, r.belowMin, r.aboveMin, r.untrustedMin, r.noReadingMin, r.noBandMin])
            expect(v).toBeGreaterThanOrEqual(0);
        },
      ),
    );
  });

  it('burden is never negative', () => {
    fc.assert(
      fc.property(
        readingsArb(fc.option(fc.double({ min: 0, max: 100, noNaN: true }))),
        ordersArb,
        windowArb,
        (readings, orders, window) => {
          expect(bandCompliance(readings, orders, window).burdenPctMin).toBeGreaterThanOrEqual(0);
        },
      ),
    );
  });

  it('burden is zero when every trusted reading is in band (at or above every lower limit)', () => {
    fc.assert(
      fc.property(
        readingsArb(fc.option(fc.integer({ min: 50, max: 100 }))),
        ordersArb,
        windowArb,
        (readings, orders, window) => {
          const floor = Math.max(0, ...orders.map((o) => o.low));
          const lifted = readings.map((r) => (isTrusted(r) ? { ...r, spo2: Math.max(r.spo2 as number, floor) } : r));
          const result = bandCompliance(lifted, orders, window);
          expect(result.burdenPctMin).toBe(0);
          expect(result.belowMin).toBe(0);
        },
      ),
    );
  });
});
