/**
 * Blood-gas computations: unit conversion, measured P/F with the Berlin bands, the alveolar–arterial
 * gradient, oxygen content from measured SaO₂, the SpO₂–SaO₂ difference of a pair, occult
 * hypoxaemia and a patient's running oximeter bias. Pure: no IO, no clock. Sources in
 * ../shared/REFERENCES.md ("Blood gases") and beside each check in compute.test.ts.
 */
import { ComputationInputError, requireInRange } from '~/lib/oxygenation/errors.ts';
import { oxygenContent } from '~/lib/oxygenation/dissociation.ts';

export const GAS_UNITS = ['kPa', 'mmHg'] as const;
export type GasUnit = (typeof GAS_UNITS)[number];
export const SAMPLE_TYPES = ['arterial', 'venous', 'capillary'] as const;
export type SampleType = (typeof SAMPLE_TYPES)[number];

/** 1 kPa = 7.50062 mmHg (from the definitions of the pascal and the mmHg). */
export const MMHG_PER_KPA = 7.50062;
/** Water vapour pressure at 37 °C, mmHg (standard alveolar gas equation). */
export const WATER_VAPOUR_MMHG = 47;
/** Respiratory quotient, by convention. */
export const RESPIRATORY_QUOTIENT = 0.8;
/** Standard sea-level barometric pressure, mmHg: the default of the unit setting. */
export const SEA_LEVEL_MMHG = 760;
/** Sjoding et al., NEJM 2020: occult hypoxaemia is SaO₂ < 88 % while SpO₂ reads ≥ 92 %. */
export const OCCULT = { sao2Below: 88, spo2AtLeast: 92 } as const;
/** Berlin definition (JAMA 2012): P/F bands, mmHg, with PEEP or CPAP ≥ 5 cmH₂O. */
export const BERLIN = { mildMax: 300, moderateMax: 200, severeMax: 100 } as const;
/** Hypercapnia: PaCO₂ above 6.0 kPa / 45 mmHg (common practice, no single source). */
export const HYPERCAPNIA_ABOVE_MMHG = 45;

export const kpaToMmHg = (kpa: number) => kpa * MMHG_PER_KPA;
export const mmHgToKpa = (mmHg: number) => mmHg / MMHG_PER_KPA;
export const toMmHg = (value: number, unit: GasUnit) => (unit === 'kPa' ? kpaToMmHg(value) : value);
export const fromMmHg = (mmHg: number, unit: GasUnit) => (unit === 'kPa' ? mmHgToKpa(mmHg) : mmHg);

/** A pressure for display: kPa to 1 decimal, mmHg whole (as blood-gas analysers print them). */
export function formatGas(mmHg: number, unit: GasUnit): string {
  return unit === 'kPa' ? `${mmHgToKpa(mmHg).toFixed(1)} kPa` : `${Math.round(mmHg)} mmHg`;
}

/** PAO₂ = FiO₂ × (Pb − PH₂O) − PaCO₂ / RQ, mmHg. */
export function alveolarPo2(fio2: number, barometricMmHg: number, paco2MmHg: number): number {
  requireInRange('fio2', fio2, 0.21, 1);
  requireInRange('barometricMmHg', barometricMmHg, 400, 1100);
  requireInRange('paco2MmHg', paco2MmHg, 0, 300);
  return fio2 * (barometricMmHg - WATER_VAPOUR_MMHG) - paco2MmHg / RESPIRATORY_QUOTIENT;
}

/** Alveolar–arterial O₂ gradient, mmHg: PAO₂ − PaO₂. */
export function aaGradient(fio2: number, barometricMmHg: number, paco2MmHg: number, pao2MmHg: number): number {
  requireInRange('pao2MmHg', pao2MmHg, 0, 1000);
  return alveolarPo2(fio2, barometricMmHg, paco2MmHg) - pao2MmHg;
}

/** Measured P/F ratio, mmHg: PaO₂ (mmHg) / FiO₂ (fraction). */
export function pfRatio(pao2MmHg: number, fio2: number): number {
  requireInRange('pao2MmHg', pao2MmHg, 0, 1000);
  requireInRange('fio2', fio2, 0.21, 1);
  return pao2MmHg / fio2;
}

export type BerlinBand = 'severe' | 'moderate' | 'mild' | 'above_300';
export const BERLIN_WORDS: Record<BerlinBand, string> = {
  severe: 'P/F ≤ 100 (Berlin severe band)',
  moderate: 'P/F 100–200 (Berlin moderate band)',
  mild: 'P/F 200–300 (Berlin mild band)',
  above_300: 'P/F above 300 (above the Berlin bands)',
};

/** Which Berlin P/F band a ratio falls in: mild 200 < P/F ≤ 300, moderate 100 < P/F ≤ 200, severe ≤ 100. Bands only, never a diagnosis. */
export function berlinBand(pf: number): BerlinBand {
  if (!Number.isFinite(pf) || pf < 0) throw new ComputationInputError('pf', 'must be a finite number ≥ 0', pf);
  if (pf <= BERLIN.severeMax) return 'severe';
  if (pf <= BERLIN.moderateMax) return 'moderate';
  if (pf <= BERLIN.mildMax) return 'mild';
  return 'above_300';
}

/** SpO₂ − SaO₂ in points: positive when the oximeter reads higher than the measured saturation. */
export function spo2Sao2Difference(spo2: number, sao2: number): number {
  requireInRange('spo2', spo2, 0, 100);
  requireInRange('sao2', sao2, 0, 100);
  return spo2 - sao2;
}

/** SaO₂ < 88 % while SpO₂ read ≥ 92 % (Sjoding 2020). */
export function isOccultHypoxaemia(sao2: number, spo2: number): boolean {
  return sao2 < OCCULT.sao2Below && spo2 >= OCCULT.spo2AtLeast;
}

/** Median of SpO₂ − SaO₂ over a patient's pairs; null with no pairs. */
export function runningBias(
  pairs: readonly { spo2: number; sao2: number }[],
): { median: number; pairs: number } | null {
  if (pairs.length === 0) return null;
  const d = pairs.map((p) => spo2Sao2Difference(p.spo2, p.sao2)).sort((a, b) => a - b);
  const mid = d.length >> 1;
  return { median: d.length % 2 ? d[mid]! : (d[mid - 1]! + d[mid]!) / 2, pairs: d.length };
}

export interface GasForDerivation {
  sampleType: SampleType;
  pao2MmHg: number;
  paco2MmHg: number;
  sao2: number;
  fio2: number;
  hbGdl: number | null;
  spo2AtSample: number | null;
}

export interface DerivedGas {
  /** Measured P/F (arterial only). */
  pf: number | null;
  berlinBand: BerlinBand | null;
  alveolarPo2: number | null;
  aaGradient: number | null;
  /** Arterial O₂ content, mL/dL, when Hb was measured. */
  oxygenContent: number | null;
  /** SpO₂ − SaO₂ for this pair. */
  spo2Difference: number | null;
  notes: string[];
}

const r1 = (v: number) => Math.round(v * 10) / 10;

/** Every figure a gas gives. A venous or capillary PO₂ is not arterial: no P/F, A–a or pair is made from it. */
export function deriveGas(g: GasForDerivation, barometricMmHg: number): DerivedGas {
  if (g.sampleType !== 'arterial') {
    return {
      pf: null,
      berlinBand: null,
      alveolarPo2: null,
      aaGradient: null,
      oxygenContent: null,
      spo2Difference: null,
      notes: [
        `${g.sampleType === 'venous' ? 'Venous' : 'Capillary'} sample: P/F, A–a gradient, O₂ content and the SpO₂ pair need an arterial sample`,
      ],
    };
  }
  const pf = pfRatio(g.pao2MmHg, g.fio2);
  const pao2 = alveolarPo2(g.fio2, barometricMmHg, g.paco2MmHg);
  const notes = ['Berlin bands apply with PEEP or CPAP ≥ 5 cmH₂O; they are shown, not a diagnosis'];
  return {
    pf: Math.round(pf),
    berlinBand: berlinBand(pf),
    alveolarPo2: r1(pao2),
    aaGradient: r1(pao2 - g.pao2MmHg),
    oxygenContent: g.hbGdl === null ? null : r1(oxygenContent(g.hbGdl, g.sao2 / 100, g.pao2MmHg)),
    spo2Difference: g.spo2AtSample === null ? null : spo2Sao2Difference(g.spo2AtSample, g.sao2),
    notes,
  };
}

export type GasFlag = 'occult_hypoxaemia';

export function gasFlags(g: Pick<GasForDerivation, 'sampleType' | 'sao2' | 'spo2AtSample'>): GasFlag[] {
  if (g.sampleType !== 'arterial' || g.spo2AtSample === null) return [];
  return isOccultHypoxaemia(g.sao2, g.spo2AtSample) ? ['occult_hypoxaemia'] : [];
}

/** Does this gas support NEWS2 Scale 2 (hypercapnic respiratory failure)? Arterial or capillary PaCO₂ above 45 mmHg. */
export function supportsScale2(g: { sampleType: SampleType; paco2MmHg: number } | null): boolean {
  return g !== null && g.sampleType !== 'venous' && g.paco2MmHg > HYPERCAPNIA_ABOVE_MMHG;
}
