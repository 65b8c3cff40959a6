import { describe, expect, it } from 'vitest';
import { RICE_SF_CUTOFFS, ROX_FAILURE_BELOW, ROX_LOWER_RISK_AT_OR_ABOVE } from './constants';
import { ComputationInputError } from './errors';
import { estimateFio2, interpretRox, pfFromSf, roxIndex, sfFromPf, sfRatio } from './indices';

describe('S/F ratio — Rice et al., Chest 2007;132:410', () => {
  it('is SpO₂ % over FiO₂ fraction', () => {
    expect(sfRatio(94, 0.4)).toBeCloseTo(235, 10);
    expect(sfRatio(100, 0.21)).toBeCloseTo(476.19, 2);
  });

  it('regression S/F = 64 + 0.84 × P/F gives 232 at P/F 200 and 316 at P/F 300', () => {
    expect(sfFromPf(200)).toBeCloseTo(232, 6);
    expect(sfFromPf(300)).toBeCloseTo(316, 6);
  });

  it('reported cut-offs are pinned separately: S/F 235 ↔ P/F 200, S/F 315 ↔ P/F 300', () => {
    expect(RICE_SF_CUTOFFS).toEqual({ pf200: 235, pf300: 315 });
  });

  it('inverts the regression, refusing above SpO₂ 97 % (derived on SpO₂ ≤ 97 %)', () => {
    const r = pfFromSf(232, 95);
    expect(r).toEqual({ pf: expect.closeTo(200, 6) });
    expect(pfFromSf(232, 98)).toHaveProperty('refused');
  });

  it('refuses FiO₂ outside 0.21–1 (e.g. typed in percent) and SpO₂ outside 0–100', () => {
    expect(() => sfRatio(95, 40)).toThrowError(ComputationInputError);
    expect(() => sfRatio(95, 0.1)).toThrowError(ComputationInputError);
    expect(() => sfRatio(120, 0.4)).toThrowError(ComputationInputError);
    expect(() => sfRatio(Number.NaN, 0.4)).toThrowError(ComputationInputError);
  });
});

describe('ROX index — Roca et al., J Crit Care 2016; Am J Respir Crit Care Med 2019', () => {
  it('example: SpO₂ 92, FiO₂ 0.6, RR 30 → 5.11', () => {
    const r = roxIndex(92, 0.6, 30, 'high_flow_nasal');
    expect(r).toHaveProperty('rox');
    if ('rox' in r) expect(r.rox).toBeCloseTo(5.11, 2);
  });

  it('is refused on any device but high-flow nasal oxygen', () => {
    for (const device of ['room_air', 'nasal_cannula', 'simple_mask', 'reservoir_mask', 'niv', 'ventilator'] as const) {
      expect(roxIndex(92, 0.6, 30, device)).toHaveProperty('refused');
    }
  });

  it('thresholds: ≥ 4.88 lower risk; < 2.85 / 3.47 / 3.85 at 2 / 6 / 12 h failure likely', () => {
    expect(ROX_LOWER_RISK_AT_OR_ABOVE).toBe(4.88);
    expect(ROX_FAILURE_BELOW).toEqual({ 2: 2.85, 6: 3.47, 12: 3.85 });
    expect(interpretRox(4.88, 2)).toBe('lower_risk');
    expect(interpretRox(4.87, 12)).toBe('indeterminate');
    expect(interpretRox(2.84, 2)).toBe('failure_likely');
    expect(interpretRox(2.85, 2)).toBe('indeterminate');
    expect(interpretRox(3.46, 6)).toBe('failure_likely');
    expect(interpretRox(3.47, 6)).toBe('indeterminate');
    expect(interpretRox(3.84, 12)).toBe('failure_likely');
    expect(interpretRox(3.85, 12)).toBe('indeterminate');
  });

  it('refuses a respiratory rate of 0 and other checkpoints', () => {
    expect(() => roxIndex(92, 0.6, 0, 'high_flow_nasal')).toThrowError(ComputationInputError);
    expect(() => interpretRox(5, 4 as never)).toThrowError(ComputationInputError);
  });
});

describe('Estimated FiO₂ (common practice; BTS 2017 summaries — no single source)', () => {
  it('room air is 0.21, labelled estimated', () => {
    expect(estimateFio2('room_air', null)).toMatchObject({ fio2: 0.21, estimated: true });
  });

  it('nasal cannula: 0.21 + 0.04 per L/min over 1–6 L/min (quoted as about 0.24–0.44)', () => {
    const one = estimateFio2('nasal_cannula', 1);
    const six = estimateFio2('nasal_cannula', 6);
    expect(one).toMatchObject({ fio2: expect.closeTo(0.25, 10), estimated: true });
    expect(six).toMatchObject({ fio2: expect.closeTo(0.45, 10), estimated: true });
    // The rule and the quoted range are both "about": they agree within 0.01.
    if ('fio2' in one && 'fio2' in six) {
      expect(Math.abs(one.fio2 - 0.24)).toBeLessThanOrEqual(0.01 + 1e-12);
      expect(Math.abs(six.fio2 - 0.44)).toBeLessThanOrEqual(0.01 + 1e-12);
    }
    expect(estimateFio2('nasal_cannula', 8)).toHaveProperty('refused');
  });

  it('simple face mask 5–10 L/min spans about 0.40–0.60', () => {
    expect(estimateFio2('simple_mask', 5)).toMatchObject({ fio2: expect.closeTo(0.4, 10), low: 0.4, high: 0.6 });
    expect(estimateFio2('simple_mask', 10)).toMatchObject({ fio2: expect.closeTo(0.6, 10) });
    expect(estimateFio2('simple_mask', 3)).toHaveProperty('refused');
  });

  it('reservoir mask at 15 L/min carries the quoted 0.60–0.90 range', () => {
    expect(estimateFio2('reservoir_mask', 15)).toMatchObject({ low: 0.6, high: 0.9, estimated: true });
    expect(estimateFio2('reservoir_mask', 10)).toHaveProperty('refused');
  });

  it('refuses high-flow, NIV and ventilators: FiO₂ is set there and must be charted', () => {
    for (const device of ['high_flow_nasal', 'niv', 'ventilator'] as const) {
      const r = estimateFio2(device, 40);
      expect(r).toHaveProperty('refused');
      if ('refused' in r) expect(r.refused).toMatch(/charted|chart/);
    }
  });

  it('throws on negative or NaN flow and unknown devices', () => {
    expect(() => estimateFio2('nasal_cannula', -2)).toThrowError(ComputationInputError);
    expect(() => estimateFio2('nasal_cannula', Number.NaN)).toThrowError(ComputationInputError);
    expect(() => estimateFio2('tent' as never, 2)).toThrowError(ComputationInputError);
  });
});
