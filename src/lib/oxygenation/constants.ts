/**
 * Published constants, pinned in one place with their sources. Nothing here is tunable: tunable
 * defaults live in settings.ts. Where the project only has a value through secondary sources or
 * from memory, the comment says so.
 */

// ── Oxygen content (standard physiology) ─────────────────────────────────────────────────────
/** Hüfner factor, mL O₂ per g haemoglobin. Values from 1.34 to 1.39 are in use; we pin 1.34. */
export const HUFNER_ML_PER_G = 1.34;
/** Solubility of O₂ in plasma, mL/dL per mmHg. */
export const DISSOLVED_O2_ML_PER_DL_PER_MMHG = 0.003;

// ── Oxygen dissociation ──────────────────────────────────────────────────────────────────────
/** Severinghaus, J Appl Physiol 1979;46:599: S = 1 / (23400 / (PO₂³ + 150·PO₂) + 1). */
export const SEVERINGHAUS = { numerator: 23400, linear: 150 } as const;
/**
 * Ellis, J Appl Physiol 1989;67:902, exact inversion of Severinghaus:
 * PaO₂ = ∛(11700/C + √(50³ + (11700/C)²)) + ∛(11700/C − √(50³ + (11700/C)²)), C = 1/S − 1.
 */
export const ELLIS = { half: 11700, cubeTerm: 50 } as const;
/** Brown et al., Chest 2016;150:307: imputing PaO₂ from SpO₂ is valid only at SpO₂ ≤ 96 %. */
export const IMPUTED_PF_MAX_SPO2_PCT = 96;

// ── S/F ratio — Rice et al., Chest 2007;132:410 ─────────────────────────────────────────────
/** Regression S/F = 64 + 0.84 × P/F. */
export const RICE_SF_INTERCEPT = 64;
export const RICE_SF_SLOPE = 0.84;
/** Reported cut-offs (the regression itself gives 232 and 316). */
export const RICE_SF_CUTOFFS = { pf200: 235, pf300: 315 } as const;
/** The regression was derived on SpO₂ ≤ 97 %. */
export const RICE_DERIVED_MAX_SPO2_PCT = 97;

// ── ROX index — Roca et al., J Crit Care 2016; Am J Respir Crit Care Med 2019 ────────────────
/** ROX ≥ 4.88 at 2, 6 or 12 h of high-flow nasal oxygen: lower risk of intubation. */
export const ROX_LOWER_RISK_AT_OR_ABOVE = 4.88;
/** ROX below these at 2, 6 and 12 h: high-flow failure likely. */
export const ROX_FAILURE_BELOW = { 2: 2.85, 6: 3.47, 12: 3.85 } as const;

// ── Beer–Lambert, extinction coefficients tabulated by S. Prahl (OMLC) ──────────────────────
/**
 * Molar extinction coefficients in cm⁻¹/M at 660 nm and 940 nm. Seen through secondary sources
 * quoting Prahl's OMLC table; pinned here so every use shares one set.
 */
export const PRAHL_EXTINCTION = {
  hbo2_660: 319.6,
  hb_660: 3226.56,
  hbo2_940: 1214,
  hb_940: 693.44,
} as const;
/** Wavelengths in common use for pulse oximetry (common practice). */
export const RED_NM = 660;
export const INFRARED_NM = 940;

// ── Oximeter calibration range — ISO 80601-2-61:2017 ─────────────────────────────────────────
/** Oximeters are usually calibrated over SaO₂ 70–100 %; readings below are outside it. */
export const OXIMETER_CALIBRATED_RANGE_PCT = { low: 70, high: 100 } as const;

// ── Room air ──────────────────────────────────────────────────────────────────────────────────
export const ROOM_AIR_FIO2 = 0.21;

// ── FiO₂ estimates (common practice; BTS 2017 summaries) — no single source ─────────────────
/** Nasal cannula: about 0.21 + 0.04 per L/min over 1–6 L/min. */
export const NASAL_CANNULA_ESTIMATE = { base: 0.21, perLpm: 0.04, minLpm: 1, maxLpm: 6 } as const;
/** Simple face mask 5–10 L/min: about 0.40–0.60 (we interpolate linearly across the range). */
export const SIMPLE_MASK_ESTIMATE = { minLpm: 5, maxLpm: 10, fio2AtMin: 0.4, fio2AtMax: 0.6 } as const;
/** Reservoir (non-rebreathe) mask at 15 L/min: about 0.60–0.90. */
export const RESERVOIR_MASK_ESTIMATE = { lpm: 15, fio2Low: 0.6, fio2High: 0.9 } as const;

// ── Target bands (presets for the order screen) ──────────────────────────────────────────────
export const PUBLISHED_TARGET_BANDS = [
  {
    id: 'bts_most',
    low: 94,
    high: 98,
    source:
      "British Thoracic Society oxygen guideline 2017 (O'Driscoll et al., Thorax 72 Suppl 1): most acutely ill patients",
  },
  {
    id: 'bts_hypercapnic',
    low: 88,
    high: 92,
    source: 'British Thoracic Society oxygen guideline 2017: at risk of hypercapnic respiratory failure',
  },
  {
    id: 'tsanz_most',
    low: 92,
    high: 96,
    source:
      'Thoracic Society of Australia and New Zealand oxygen guidelines 2015 (Beasley et al., Respirology 20:1182)',
  },
  {
    id: 'tsanz_hypercapnic',
    low: 88,
    high: 92,
    source: 'Thoracic Society of Australia and New Zealand 2015: COPD and other hypercapnic conditions (from memory)',
  },
] as const;

// ── NEWS2 — Royal College of Physicians, National Early Warning Score (NEWS) 2, 2017 ────────
// Each table lists the inclusive upper bound of a step and its score, lowest values first;
// values above the last bound score `above`. Whole numbers (temperature to one decimal).
export interface StepTable {
  readonly steps: readonly (readonly [upTo: number, score: number])[];
  readonly above: number;
}
export const NEWS2_RESP_RATE: StepTable = {
  steps: [
    [8, 3],
    [11, 1],
    [20, 0],
    [24, 2],
  ],
  above: 3,
};
export const NEWS2_SPO2_SCALE1: StepTable = {
  steps: [
    [91, 3],
    [93, 2],
    [95, 1],
  ],
  above: 0,
};
/** Scale 2 below 88 % and 88–92 % (any air/oxygen status); ≥ 93 % on air scores 0. */
export const NEWS2_SPO2_SCALE2_LOW: StepTable = {
  steps: [
    [83, 3],
    [85, 2],
    [87, 1],
  ],
  above: 0,
};
/** Scale 2 at ≥ 93 % on oxygen: 93–94 → 1, 95–96 → 2, ≥ 97 → 3. */
export const NEWS2_SPO2_SCALE2_ON_OXYGEN_HIGH: StepTable = {
  steps: [
    [92, 0],
    [94, 1],
    [96, 2],
  ],
  above: 3,
};
export const NEWS2_SCALE2_AIR_BOUNDARY_PCT = 93;
export const NEWS2_ON_OXYGEN_SCORE = 2;
export const NEWS2_SYSTOLIC: StepTable = {
  steps: [
    [90, 3],
    [100, 2],
    [110, 1],
    [219, 0],
  ],
  above: 3,
};
export const NEWS2_PULSE: StepTable = {
  steps: [
    [40, 3],
    [50, 1],
    [90, 0],
    [110, 1],
    [130, 2],
  ],
  above: 3,
};
export const NEWS2_TEMPERATURE: StepTable = {
  steps: [
    [35.0, 3],
    [36.0, 1],
    [38.0, 0],
    [39.0, 1],
  ],
  above: 2,
};
export const NEWS2_CONSCIOUSNESS_NOT_ALERT_SCORE = 3;
/** Response bands: 0–4 low; a single 3 with aggregate < 5 low–medium; 5–6 medium; ≥ 7 high (band words from memory of the RCP chart). */
export const NEWS2_MEDIUM_FROM = 5;
export const NEWS2_HIGH_FROM = 7;

// ── Desaturation — AASM scoring manual ───────────────────────────────────────────────────────
/** Desaturation of ≥ 3 % (rule 1A) or ≥ 4 % (rule 1B) from baseline; ODI = events per hour. */
export const AASM_DESATURATION_PCT = { rule1A: 3, rule1B: 4 } as const;
