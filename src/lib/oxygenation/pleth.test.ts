import { describe, expect, it } from 'vitest';
import { OXIMETER_CALIBRATED_RANGE_PCT, PRAHL_EXTINCTION } from './constants';
import { ComputationInputError } from './errors';
import { analysePlethStrip, beerLambertCurve, linearApproxCurve } from './pleth';
import { synthesiseStrip } from './test-fixtures';

describe('calibration curves', () => {
  it('pins Prahl’s extinction coefficients (OMLC; through secondary sources)', () => {
    expect(PRAHL_EXTINCTION).toEqual({ hbo2_660: 319.6, hb_660: 3226.56, hbo2_940: 1214, hb_940: 693.44 });
  });

  it('Beer–Lambert with Prahl coefficients: R 0.525 → 90 %, R 1.0 → 73.9 %', () => {
    expect(beerLambertCurve.spo2FromR(0.525)).toBeCloseTo(90, 1);
    expect(beerLambertCurve.spo2FromR(1.0)).toBeCloseTo(73.9, 1);
  });

  it('the forward model inverts the curve exactly', () => {
    for (const s of [70, 80, 90, 100])
      expect(beerLambertCurve.spo2FromR(beerLambertCurve.rFromSpo2(s))).toBeCloseTo(s, 9);
  });

  it('linear approximation SpO₂ ≈ 110 − 25·R (widely quoted, from memory)', () => {
    expect(linearApproxCurve.spo2FromR(0.4)).toBe(100);
    expect(linearApproxCurve.spo2FromR(1.0)).toBe(85);
  });
});

describe('pleth strip synthesised from Beer–Lambert at known saturations', () => {
  const cases: [number, number][] = [];
  for (const spo2 of [70, 75, 80, 85, 90, 95, 100]) for (const hr of [48, 75, 120]) cases.push([spo2, hr]);

  it.each(cases)('SpO₂ %s %%, pulse %s /min: R, SpO₂ within 1 point, heart rate within 1 /min', (spo2, hr) => {
    const a = analysePlethStrip(
      synthesiseStrip({ spo2Pct: spo2, heartRate: hr, noiseCounts: 2, seed: spo2 * 1000 + hr }),
    );
    const expectedR = beerLambertCurve.rFromSpo2(spo2); // from Prahl's coefficients
    expect(Math.abs(a.rMedian! - expectedR) / expectedR).toBeLessThan(0.02);
    expect(Math.abs(a.spo2! - spo2)).toBeLessThanOrEqual(1);
    expect(Math.abs(a.heartRate! - hr)).toBeLessThanOrEqual(1);
    expect(a.perfusionIndex).toBeCloseTo(2, 0);
    expect(a.curveName).toBe(beerLambertCurve.name);
    expect(a.verdict === 'trustworthy' || spo2 <= OXIMETER_CALIBRATED_RANGE_PCT.low).toBe(true);
  });

  it('a constant ambient level on every channel (dark included) changes nothing', () => {
    const base = { spo2Pct: 92, heartRate: 80, noiseCounts: 2, seed: 7 };
    const a = analysePlethStrip(synthesiseStrip(base));
    const b = analysePlethStrip(synthesiseStrip({ ...base, ambient: () => 25_000 }));
    expect(b.beats.length).toBe(a.beats.length);
    expect(b.rMedian!).toBeCloseTo(a.rMedian!, 8);
    expect(b.spo2!).toBeCloseTo(a.spo2!, 6);
    expect(b.heartRate!).toBeCloseTo(a.heartRate!, 6);
    expect(b.perfusionIndex!).toBeCloseTo(a.perfusionIndex!, 8);
    expect(b.verdict).toBe(a.verdict);
  });

  it('a slowly varying ambient level (light drifting, mains flicker) changes nothing', () => {
    const base = { spo2Pct: 86, heartRate: 64, noiseCounts: 2, seed: 11 };
    const a = analysePlethStrip(synthesiseStrip(base));
    const b = analysePlethStrip(
      synthesiseStrip({
        ...base,
        ambient: (t) => 20_000 + 15_000 * Math.sin(2 * Math.PI * 0.1 * t) + 2_000 * Math.sin(2 * Math.PI * 50 * t),
      }),
    );
    expect(b.rMedian!).toBeCloseTo(a.rMedian!, 8);
    expect(b.heartRate!).toBeCloseTo(a.heartRate!, 6);
    expect(b.skewness!).toBeCloseTo(a.skewness!, 6);
    expect(b.verdict).toBe(a.verdict);
  });

  it('motion bursts make the strip doubtful or unusable', () => {
    const burst = (t: number) =>
      (t > 2 && t < 3.2) || (t > 6 && t < 7.5) ? 8_000 * Math.sin(2 * Math.PI * 2.7 * t) : 0;
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 95, heartRate: 75, noiseCounts: 2, artefact: burst }));
    expect(['doubtful', 'unusable']).toContain(a.verdict);
    expect(a.motionFraction).toBeGreaterThan(0);
    expect(a.reasons.join(' ')).toMatch(/motion/);
  });

  it('motion through most of the strip makes it unusable', () => {
    const shaking = (t: number) => 8_000 * Math.sin(2 * Math.PI * 1.3 * t) * (t < 8 ? 1 : 0);
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 95, heartRate: 75, artefact: shaking }));
    expect(a.verdict).toBe('unusable');
    expect(a.spo2).toBeNull();
  });

  it('a flat trace (no pulse) is unusable', () => {
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 95, heartRate: 75, perfusionIndexPct: 0, noiseCounts: 2 }));
    expect(a.verdict).toBe('unusable');
    expect(a.spo2).toBeNull();
    expect(a.reasons.join(' ')).toMatch(/flat/);
  });

  it('perfusion index under 0.4 % is doubtful (common practice; setting)', () => {
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 95, heartRate: 75, perfusionIndexPct: 0.3 }));
    expect(a.perfusionIndex!).toBeCloseTo(0.3, 1);
    expect(a.verdict).toBe('doubtful');
    expect(a.reasons.join(' ')).toMatch(/perfusion index/);
  });

  it('no light left after dark subtraction is unusable', () => {
    const strip = synthesiseStrip({ spo2Pct: 95, heartRate: 75 });
    const a = analysePlethStrip({ ...strip, red: strip.dark, infrared: strip.dark });
    expect(a.verdict).toBe('unusable');
  });

  it('a strip too short for three beats is unusable, not a guess', () => {
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 95, heartRate: 60, seconds: 2 }));
    expect(a.verdict).toBe('unusable');
    expect(a.spo2).toBeNull();
    expect(a.heartRate).toBeNull();
  });

  it('uses the curve it is given', () => {
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 85, heartRate: 75 }), linearApproxCurve);
    expect(a.curveName).toBe(linearApproxCurve.name);
    expect(a.spo2).toBeCloseTo(110 - 25 * a.rMedian!, 10);
  });

  it('a curve value just over 100 % (measurement noise) is reported as 100 with a note, without lowering the verdict', () => {
    // R 2 % under the 0.263 that Beer–Lambert gives at 100 % (Prahl): about 100.2 % on the curve.
    const a = analysePlethStrip(
      synthesiseStrip({ spo2Pct: 100, ratio: beerLambertCurve.rFromSpo2(100) * 0.98, heartRate: 75 }),
    );
    expect(a.spo2).toBe(100);
    expect(a.notes.join(' ')).toMatch(/reported as 100 %/);
    expect(a.verdict).toBe('trustworthy');
  });

  it('R below the range the curve covers makes the verdict doubtful with the reason (issue 10 point 9)', () => {
    // Linear approximation 110 − 25·R (from memory): 100 % at R 0.4; a fully saturated strip (R ≈ 0.26 by
    // Prahl's coefficients) lies below that, so the curve cannot read it.
    const a = analysePlethStrip(synthesiseStrip({ spo2Pct: 100, heartRate: 75 }), linearApproxCurve);
    expect(110 - 25 * a.rMedian!).toBeGreaterThan(101);
    expect(a.spo2).toBe(100);
    expect(a.verdict).toBe('doubtful');
    expect(a.reasons.join(' ')).toMatch(/^R 0\.\d{3} is below the lowest the curve covers \(0\.400 at 100 %\)/);
    // And the Beer–Lambert curve: a strip drawn with R 0.20, under the 0.263 it gives at 100 % (319.6 / 1214, Prahl).
    const b = analysePlethStrip(synthesiseStrip({ spo2Pct: 100, ratio: 0.2, heartRate: 75 }));
    expect(b.rMedian).toBeCloseTo(0.2, 2);
    expect(b.verdict).toBe('doubtful');
    expect(b.reasons.join(' ')).toContain('below the lowest the curve covers (0.263 at 100 %)');
  });

  it('throws on empty, unequal or non-finite channels and a bad sample rate', () => {
    const strip = synthesiseStrip({ spo2Pct: 95, heartRate: 75, seconds: 4 });
    expect(() => analysePlethStrip({ ...strip, red: [], infrared: [], dark: [] })).toThrowError(ComputationInputError);
    expect(() => analysePlethStrip({ ...strip, dark: strip.dark.slice(1) })).toThrowError(ComputationInputError);
    expect(() => analysePlethStrip({ ...strip, red: [...strip.red.slice(1), Number.NaN] })).toThrowError(
      ComputationInputError,
    );
    expect(() => analysePlethStrip({ ...strip, sampleRateHz: 0 })).toThrowError(ComputationInputError);
  });
});
