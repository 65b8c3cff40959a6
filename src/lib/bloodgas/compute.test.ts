import { describe, expect, it } from 'vitest';
import {
  aaGradient,
  alveolarPo2,
  berlinBand,
  deriveGas,
  formatGas,
  gasFlags,
  isOccultHypoxaemia,
  kpaToMmHg,
  MMHG_PER_KPA,
  mmHgToKpa,
  pfRatio,
  runningBias,
  spo2Sao2Difference,
  supportsScale2,
  RESPIRATORY_QUOTIENT,
  WATER_VAPOUR_MMHG,
} from './compute.ts';

describe('kPa ↔ mmHg (1 kPa = 7.50062 mmHg, from the definitions of the pascal and the mmHg)', () => {
  it('pins the factor', () => expect(MMHG_PER_KPA).toBe(7.50062));
  it('converts both ways', () => {
    expect(kpaToMmHg(1)).toBeCloseTo(7.50062, 5);
    expect(kpaToMmHg(13.3)).toBeCloseTo(99.758, 3);
    expect(mmHgToKpa(40)).toBeCloseTo(5.333, 3);
    expect(mmHgToKpa(kpaToMmHg(8.4))).toBeCloseTo(8.4, 10);
  });
  it('prints kPa to one decimal and mmHg whole', () => {
    expect(formatGas(40, 'kPa')).toBe('5.3 kPa');
    expect(formatGas(99.6, 'mmHg')).toBe('100 mmHg');
  });
});

describe('Alveolar gas equation, standard form (PH₂O 47 mmHg, RQ 0.8; worked check in REFERENCES.md "Blood gases")', () => {
  it('pins water vapour and RQ', () => {
    expect(WATER_VAPOUR_MMHG).toBe(47);
    expect(RESPIRATORY_QUOTIENT).toBe(0.8);
  });
  it('FiO₂ 0.21, Pb 760, PaCO₂ 40, PaO₂ 90 mmHg → PAO₂ 99.7, A–a 9.7 mmHg', () => {
    expect(alveolarPo2(0.21, 760, 40)).toBeCloseTo(99.73, 2);
    expect(aaGradient(0.21, 760, 40, 90)).toBeCloseTo(9.73, 2);
  });
  it('refuses a FiO₂ given as a percentage', () => expect(() => alveolarPo2(21, 760, 40)).toThrow(/fio2/));
});

describe('Measured P/F and the Berlin bands (ARDS Definition Task Force, JAMA 2012;307:2526)', () => {
  it('P/F is PaO₂ over FiO₂', () => expect(pfRatio(80, 0.4)).toBe(200));
  it('mild 200 < P/F ≤ 300, moderate 100 < P/F ≤ 200, severe ≤ 100', () => {
    expect(berlinBand(300)).toBe('mild');
    expect(berlinBand(300.5)).toBe('above_300');
    expect(berlinBand(200.5)).toBe('mild');
    expect(berlinBand(200)).toBe('moderate');
    expect(berlinBand(100.5)).toBe('moderate');
    expect(berlinBand(100)).toBe('severe');
    expect(berlinBand(55)).toBe('severe');
  });
});

describe('Occult hypoxaemia (Sjoding et al., N Engl J Med 2020;383:2477: SaO₂ < 88 % while SpO₂ reads ≥ 92 %)', () => {
  it('flags SaO₂ 87 with SpO₂ 92', () => expect(isOccultHypoxaemia(87, 92)).toBe(true));
  it('not at SaO₂ 88', () => expect(isOccultHypoxaemia(88, 95)).toBe(false));
  it('not when SpO₂ read 91', () => expect(isOccultHypoxaemia(85, 91)).toBe(false));
  it('only for arterial samples with a paired SpO₂', () => {
    expect(gasFlags({ sampleType: 'arterial', sao2: 85, spo2AtSample: 94 })).toEqual(['occult_hypoxaemia']);
    expect(gasFlags({ sampleType: 'venous', sao2: 70, spo2AtSample: 94 })).toEqual([]);
    expect(gasFlags({ sampleType: 'arterial', sao2: 85, spo2AtSample: null })).toEqual([]);
  });
});

describe('SpO₂–SaO₂ difference and running bias (median over the pairs; our definition)', () => {
  it('difference is SpO₂ minus SaO₂', () => expect(spo2Sao2Difference(94, 86)).toBe(8));
  it('median of odd and even counts', () => {
    expect(
      runningBias([
        { spo2: 94, sao2: 86 },
        { spo2: 95, sao2: 93 },
        { spo2: 92, sao2: 89 },
      ]),
    ).toEqual({ median: 3, pairs: 3 });
    expect(
      runningBias([
        { spo2: 94, sao2: 86 },
        { spo2: 95, sao2: 93 },
      ]),
    ).toEqual({ median: 5, pairs: 2 });
    expect(runningBias([])).toBeNull();
  });
});

describe('deriveGas', () => {
  it('oxygen content from measured SaO₂ (standard physiology: Hb 15, 0.98, 100 mmHg → 20.0 mL/dL)', () => {
    const d = deriveGas(
      { sampleType: 'arterial', pao2MmHg: 100, paco2MmHg: 40, sao2: 98, fio2: 0.21, hbGdl: 15, spo2AtSample: 97 },
      760,
    );
    expect(d.oxygenContent).toBe(20);
    expect(d.pf).toBe(476);
    expect(d.berlinBand).toBe('above_300');
    expect(d.spo2Difference).toBe(-1);
  });
  it('the REFERENCES.md alveolar check through deriveGas', () => {
    const d = deriveGas(
      { sampleType: 'arterial', pao2MmHg: 90, paco2MmHg: 40, sao2: 97, fio2: 0.21, hbGdl: null, spo2AtSample: null },
      760,
    );
    expect(d.alveolarPo2).toBe(99.7);
    expect(d.aaGradient).toBe(9.7);
    expect(d.oxygenContent).toBeNull();
  });
  it('a venous sample gives no arterial figures and says why', () => {
    const d = deriveGas(
      { sampleType: 'venous', pao2MmHg: 40, paco2MmHg: 46, sao2: 70, fio2: 0.4, hbGdl: 12, spo2AtSample: 95 },
      760,
    );
    expect(d.pf).toBeNull();
    expect(d.aaGradient).toBeNull();
    expect(d.notes[0]).toMatch(/arterial sample/);
  });
});

describe('Scale 2 support (hypercapnia PaCO₂ > 45 mmHg / 6.0 kPa: common practice, no single source)', () => {
  it('supports with an arterial PaCO₂ above 45 mmHg', () =>
    expect(supportsScale2({ sampleType: 'arterial', paco2MmHg: kpaToMmHg(7.2) })).toBe(true));
  it('not at 45 mmHg, not from a venous gas, not without a gas', () => {
    expect(supportsScale2({ sampleType: 'arterial', paco2MmHg: 45 })).toBe(false);
    expect(supportsScale2({ sampleType: 'venous', paco2MmHg: 60 })).toBe(false);
    expect(supportsScale2(null)).toBe(false);
  });
});
