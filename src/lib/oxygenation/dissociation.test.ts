import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { HUFNER_ML_PER_G } from './constants';
import { ellisPao2, imputedPf, oxygenContent, severinghausSaturation } from './dissociation';
import { ComputationInputError } from './errors';

describe('Severinghaus, J Appl Physiol 1979;46:599', () => {
  it.each([
    [27, 50.35],
    [60, 90.58],
    [100, 97.75],
  ])('PO₂ %s mmHg → %s %%', (po2, pct) => {
    expect(severinghausSaturation(po2) * 100).toBeCloseTo(pct, 2);
  });

  it('is 0 at PO₂ 0 and refuses negative or non-finite PO₂', () => {
    expect(severinghausSaturation(0)).toBe(0);
    expect(() => severinghausSaturation(-1)).toThrowError(ComputationInputError);
    expect(() => severinghausSaturation(Number.NaN)).toThrowError(ComputationInputError);
  });
});

describe('Ellis inversion, J Appl Physiol 1989;67:902', () => {
  it.each([
    [0.88, 54.67],
    [0.9, 58.66],
    [0.94, 70.87],
    [0.96, 81.9],
  ])('S %s → PaO₂ %s mmHg', (s, pao2) => {
    expect(ellisPao2(s)).toBeCloseTo(pao2, 2);
  });

  it('round-trips with Severinghaus (exact inversion, so only float error remains)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1, max: 600, noNaN: true }), (po2) => {
        expect(ellisPao2(severinghausSaturation(po2))).toBeCloseTo(po2, 6);
      }),
    );
  });

  it('refuses saturations of 0, 1 and outside 0–1 (no finite PO₂ there)', () => {
    for (const s of [0, 1, 1.2, -0.1, Number.NaN]) expect(() => ellisPao2(s)).toThrowError(ComputationInputError);
  });
});

describe('Imputed P/F (Ellis; valid only at SpO₂ ≤ 96 % — Brown et al., Chest 2016;150:307)', () => {
  it('imputes PaO₂ 81.90 at SpO₂ 96 % and divides by FiO₂', () => {
    const r = imputedPf(96, 0.5);
    expect('pf' in r).toBe(true);
    if ('pf' in r) {
      expect(r.pao2).toBeCloseTo(81.9, 2);
      expect(r.pf).toBeCloseTo(81.9 / 0.5, 1);
    }
  });

  it('refuses above 96 % and says why', () => {
    const r = imputedPf(97, 0.5);
    expect(r).toHaveProperty('refused');
    if ('refused' in r) expect(r.refused).toMatch(/96 %.*Brown/);
  });

  it('refuses FiO₂ given in percent and SpO₂ of 0', () => {
    expect(() => imputedPf(90, 40)).toThrowError(ComputationInputError);
    expect(() => imputedPf(0, 0.4)).toThrowError(ComputationInputError);
  });
});

describe('Oxygen content (standard physiology; Hüfner factor pinned at 1.34)', () => {
  it('pins 1.34', () => expect(HUFNER_ML_PER_G).toBe(1.34));

  it('Hb 15 g/dL, SaO₂ 0.98, PaO₂ 100 mmHg → 20.0 mL/dL', () => {
    expect(oxygenContent(15, 0.98, 100)).toBeCloseTo(20.0, 1);
  });

  it('refuses saturation in percent and negative haemoglobin', () => {
    expect(() => oxygenContent(15, 98, 100)).toThrowError(ComputationInputError);
    expect(() => oxygenContent(-1, 0.98, 100)).toThrowError(ComputationInputError);
  });
});
