import {
  NASAL_CANNULA_ESTIMATE,
  RESERVOIR_MASK_ESTIMATE,
  RICE_DERIVED_MAX_SPO2_PCT,
  RICE_SF_INTERCEPT,
  RICE_SF_SLOPE,
  ROOM_AIR_FIO2,
  ROX_FAILURE_BELOW,
  ROX_LOWER_RISK_AT_OR_ABOVE,
  SIMPLE_MASK_ESTIMATE,
} from './constants';
import { ComputationInputError, requireInRange } from './errors';
import { INPUT_LIMITS } from './settings';
import { OXYGEN_DEVICES, type OxygenDevice } from './types';

export type Refusal = { refused: string };

function checkSpo2(spo2Pct: number): number {
  requireInRange('spo2Pct', spo2Pct, INPUT_LIMITS.spo2.min, INPUT_LIMITS.spo2.max);
  if (spo2Pct === 0) throw new ComputationInputError('spo2Pct', 'must be greater than zero', spo2Pct);
  return spo2Pct;
}

function checkFio2(fio2Fraction: number): number {
  // A value above 1 is almost always FiO₂ typed in percent: refuse rather than guess.
  return requireInRange('fio2Fraction', fio2Fraction, INPUT_LIMITS.fio2.min, INPUT_LIMITS.fio2.max);
}

/** S/F ratio = SpO₂ (%) / FiO₂ (fraction) (Rice et al., Chest 2007;132:410). */
export function sfRatio(spo2Pct: number, fio2Fraction: number): number {
  return checkSpo2(spo2Pct) / checkFio2(fio2Fraction);
}

/** Rice 2007 regression S/F = 64 + 0.84 × P/F. */
export function sfFromPf(pf: number): number {
  requireInRange('pf', pf, 0, 1000);
  return RICE_SF_INTERCEPT + RICE_SF_SLOPE * pf;
}

/**
 * P/F estimated from S/F by inverting the Rice 2007 regression. Refused above SpO₂ 97 %, the
 * range the regression was derived on (the flat top of the dissociation curve hides P/F there).
 */
export function pfFromSf(sf: number, spo2Pct: number): { pf: number } | Refusal {
  requireInRange('sf', sf, 0, 500);
  checkSpo2(spo2Pct);
  if (spo2Pct > RICE_DERIVED_MAX_SPO2_PCT) {
    return {
      refused: `SpO₂ above ${RICE_DERIVED_MAX_SPO2_PCT} %: the Rice 2007 S/F–P/F regression was derived on SpO₂ ≤ ${RICE_DERIVED_MAX_SPO2_PCT} %`,
    };
  }
  return { pf: (sf - RICE_SF_INTERCEPT) / RICE_SF_SLOPE };
}

export type RoxCheckpointHours = 2 | 6 | 12;
export type RoxInterpretation = 'lower_risk' | 'failure_likely' | 'indeterminate';

/**
 * ROX index = (SpO₂ % / FiO₂ fraction) / respiratory rate (Roca et al., J Crit Care 2016).
 * Only defined on high-flow nasal oxygen; any other device is refused with the reason.
 */
export function roxIndex(
  spo2Pct: number,
  fio2Fraction: number,
  respRate: number,
  device: OxygenDevice,
): { rox: number } | Refusal {
  const sf = sfRatio(spo2Pct, fio2Fraction);
  requireInRange('respRate', respRate, INPUT_LIMITS.respRate.min, INPUT_LIMITS.respRate.max);
  if (respRate === 0) throw new ComputationInputError('respRate', 'must be greater than zero', respRate);
  if (!OXYGEN_DEVICES.includes(device))
    throw new ComputationInputError('device', 'is not a known oxygen device', device);
  if (device !== 'high_flow_nasal') {
    return { refused: 'ROX is defined only on high-flow nasal oxygen (Roca 2016, 2019)' };
  }
  return { rox: sf / respRate };
}

/**
 * Reading of a ROX value at 2, 6 or 12 h of high-flow (Roca, Am J Respir Crit Care Med 2019):
 * ≥ 4.88 lower risk of intubation; < 2.85 / 3.47 / 3.85 failure likely; otherwise indeterminate.
 */
export function interpretRox(rox: number, hoursOnHighFlow: RoxCheckpointHours): RoxInterpretation {
  requireInRange('rox', rox, 0, Infinity);
  const failureBelow = ROX_FAILURE_BELOW[hoursOnHighFlow];
  if (failureBelow === undefined)
    throw new ComputationInputError('hoursOnHighFlow', 'must be 2, 6 or 12', hoursOnHighFlow);
  if (rox >= ROX_LOWER_RISK_AT_OR_ABOVE) return 'lower_risk';
  if (rox < failureBelow) return 'failure_likely';
  return 'indeterminate';
}

export type Fio2Estimate = {
  fio2: number;
  /** The quoted range the estimate comes from (equal to fio2 where the rule gives a point). */
  low: number;
  high: number;
  estimated: true;
  basis: string;
};

/**
 * FiO₂ estimated from device and flow (common practice; BTS 2017 summaries — no single source).
 * Always labelled estimated. Refused for high-flow, NIV and ventilators (FiO₂ is set there and
 * must be charted) and for flows outside the range the rule of thumb covers.
 */
export function estimateFio2(device: OxygenDevice, flowLpm: number | null): Fio2Estimate | Refusal {
  if (!OXYGEN_DEVICES.includes(device))
    throw new ComputationInputError('device', 'is not a known oxygen device', device);
  if (flowLpm !== null) requireInRange('flowLpm', flowLpm, INPUT_LIMITS.flowLpm.min, INPUT_LIMITS.flowLpm.max);
  switch (device) {
    case 'room_air':
      return { fio2: ROOM_AIR_FIO2, low: ROOM_AIR_FIO2, high: ROOM_AIR_FIO2, estimated: true, basis: 'room air' };
    case 'high_flow_nasal':
    case 'niv':
    case 'ventilator':
      return { refused: 'FiO₂ is set on high-flow, NIV and ventilators: chart the set value, never an estimate' };
    case 'nasal_cannula': {
      const { base, perLpm, minLpm, maxLpm } = NASAL_CANNULA_ESTIMATE;
      if (flowLpm === null || flowLpm < minLpm || flowLpm > maxLpm) {
        return { refused: `nasal cannula estimate covers ${minLpm}–${maxLpm} L/min only` };
      }
      const fio2 = base + perLpm * flowLpm;
      return {
        fio2,
        low: fio2,
        high: fio2,
        estimated: true,
        basis: 'nasal cannula: about 0.21 + 0.04 per L/min (common practice)',
      };
    }
    case 'simple_mask': {
      const { minLpm, maxLpm, fio2AtMin, fio2AtMax } = SIMPLE_MASK_ESTIMATE;
      if (flowLpm === null || flowLpm < minLpm || flowLpm > maxLpm) {
        return { refused: `simple face mask estimate covers ${minLpm}–${maxLpm} L/min only` };
      }
      const fio2 = fio2AtMin + ((flowLpm - minLpm) / (maxLpm - minLpm)) * (fio2AtMax - fio2AtMin);
      return {
        fio2,
        low: fio2AtMin,
        high: fio2AtMax,
        estimated: true,
        basis: 'simple face mask 5–10 L/min: about 0.40–0.60, interpolated (common practice)',
      };
    }
    case 'reservoir_mask': {
      const { lpm, fio2Low, fio2High } = RESERVOIR_MASK_ESTIMATE;
      if (flowLpm !== lpm) return { refused: `reservoir mask estimate is quoted at ${lpm} L/min only` };
      // The quoted range is wide; its midpoint is reported and the range travels with it.
      return {
        fio2: (fio2Low + fio2High) / 2,
        low: fio2Low,
        high: fio2High,
        estimated: true,
        basis: 'reservoir mask at 15 L/min: about 0.60–0.90, midpoint (common practice)',
      };
    }
  }
}
