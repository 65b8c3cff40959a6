import {
  DISSOLVED_O2_ML_PER_DL_PER_MMHG,
  ELLIS,
  HUFNER_ML_PER_G,
  IMPUTED_PF_MAX_SPO2_PCT,
  SEVERINGHAUS,
} from './constants';
import { ComputationInputError, requireInRange } from './errors';
import { INPUT_LIMITS } from './settings';
import type { Refusal } from './indices';

/**
 * Haemoglobin saturation (fraction 0–1) at a PO₂ in mmHg, standard conditions
 * (Severinghaus, J Appl Physiol 1979;46:599): S = 1 / (23400 / (PO₂³ + 150·PO₂) + 1).
 */
export function severinghausSaturation(po2MmHg: number): number {
  const p = requireInRange('po2MmHg', po2MmHg, INPUT_LIMITS.po2MmHg.min, INPUT_LIMITS.po2MmHg.max);
  if (p === 0) return 0;
  return 1 / (SEVERINGHAUS.numerator / (p * p * p + SEVERINGHAUS.linear * p) + 1);
}

/**
 * PO₂ (mmHg) from saturation (fraction, strictly between 0 and 1): Ellis's exact inversion of the
 * Severinghaus equation (J Appl Physiol 1989;67:902), with real, sign-keeping cube roots.
 */
export function ellisPao2(saturationFraction: number): number {
  const s = requireInRange('saturationFraction', saturationFraction, 0, 1);
  if (s === 0 || s === 1) {
    throw new ComputationInputError(
      'saturationFraction',
      'must be strictly between 0 and 1 (the curve has no finite PO₂ at 1)',
      s,
    );
  }
  const c = 1 / s - 1;
  const a = ELLIS.half / c;
  const root = Math.sqrt(ELLIS.cubeTerm ** 3 + a * a);
  return Math.cbrt(a + root) + Math.cbrt(a - root);
}

/**
 * Imputed PaO₂ and P/F from SpO₂ and FiO₂, via Ellis's inversion. Refused above SpO₂ 96 %: on the
 * flat top of the curve SpO₂ says little about PaO₂ (Brown et al., Chest 2016;150:307).
 */
export function imputedPf(spo2Pct: number, fio2Fraction: number): { pao2: number; pf: number } | Refusal {
  requireInRange('spo2Pct', spo2Pct, INPUT_LIMITS.spo2.min, INPUT_LIMITS.spo2.max);
  requireInRange('fio2Fraction', fio2Fraction, INPUT_LIMITS.fio2.min, INPUT_LIMITS.fio2.max);
  if (spo2Pct > IMPUTED_PF_MAX_SPO2_PCT) {
    return {
      refused: `SpO₂ above ${IMPUTED_PF_MAX_SPO2_PCT} %: imputing PaO₂ is valid only at SpO₂ ≤ ${IMPUTED_PF_MAX_SPO2_PCT} % (Brown et al., Chest 2016)`,
    };
  }
  if (spo2Pct === 0) throw new ComputationInputError('spo2Pct', 'must be greater than zero', spo2Pct);
  const pao2 = ellisPao2(spo2Pct / 100);
  return { pao2, pf: pao2 / fio2Fraction };
}

/** Arterial oxygen content, mL/dL: 1.34 × Hb (g/dL) × SaO₂ (fraction) + 0.003 × PaO₂ (mmHg). */
export function oxygenContent(hbGdl: number, sao2Fraction: number, pao2MmHg: number): number {
  requireInRange('hbGdl', hbGdl, INPUT_LIMITS.haemoglobinGdl.min, INPUT_LIMITS.haemoglobinGdl.max);
  requireInRange('sao2Fraction', sao2Fraction, 0, 1);
  requireInRange('pao2MmHg', pao2MmHg, INPUT_LIMITS.po2MmHg.min, INPUT_LIMITS.po2MmHg.max);
  return HUFNER_ML_PER_G * hbGdl * sao2Fraction + DISSOLVED_O2_ML_PER_DL_PER_MMHG * pao2MmHg;
}
