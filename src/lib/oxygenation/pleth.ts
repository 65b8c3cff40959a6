import { OXIMETER_CALIBRATED_RANGE_PCT, PRAHL_EXTINCTION } from './constants';
import { ComputationInputError, requirePositive } from './errors';
import { DEFAULT_PLETH_SETTINGS, resolveSettings, type PlethSettings } from './settings';

/** Maps the ratio of ratios R to SpO₂ %. Swappable: real oximeters use empirical curves. */
export interface CalibrationCurve {
  name: string;
  source: string;
  spo2FromR(r: number): number;
}

const E = PRAHL_EXTINCTION;

/**
 * Theoretical curve from Beer–Lambert with Prahl's extinction coefficients (constants.ts):
 * SaO₂ = (εHb₆₆₀ − R·εHb₉₄₀) / (εHb₆₆₀ − εHbO₂₆₆₀ + R·(εHbO₂₉₄₀ − εHb₉₄₀)).
 * Real oximeters differ from it (scattering, tissue); it is the physics, not a device calibration.
 */
export const beerLambertCurve: CalibrationCurve & { rFromSpo2(spo2Pct: number): number } = {
  name: 'beer-lambert-prahl',
  source: 'Beer–Lambert ratio of ratios, extinction coefficients tabulated by S. Prahl (OMLC), 660/940 nm',
  spo2FromR(r: number): number {
    return (100 * (E.hb_660 - r * E.hb_940)) / (E.hb_660 - E.hbo2_660 + r * (E.hbo2_940 - E.hb_940));
  },
  /** Forward model: R that Beer–Lambert predicts at a saturation (for checks and synthesis). */
  rFromSpo2(spo2Pct: number): number {
    const s = spo2Pct / 100;
    return (E.hbo2_660 * s + E.hb_660 * (1 - s)) / (E.hbo2_940 * s + E.hb_940 * (1 - s));
  },
};

/** SpO₂ ≈ 110 − 25·R: the widely quoted linear approximation of empirical curves (from memory). */
export const linearApproxCurve: CalibrationCurve = {
  name: 'linear-110-25r',
  source: 'SpO₂ ≈ 110 − 25·R, widely quoted linear approximation of empirical calibration (from memory)',
  spo2FromR(r: number): number {
    return 110 - 25 * r;
  },
};

export interface PlethStrip {
  sampleRateHz: number;
  /** Raw detector counts while the red (≈660 nm) emitter is on. */
  red: number[];
  /** Raw detector counts while the infrared (≈940 nm) emitter is on. */
  infrared: number[];
  /** Raw detector counts with both emitters off: ambient light and detector offset. */
  dark: number[];
}

export interface PlethBeat {
  /** Seconds from the start of the strip to the systolic peak that opens the beat. */
  startSec: number;
  endSec: number;
  acRed: number;
  dcRed: number;
  acIr: number;
  dcIr: number;
  r: number;
  /** True when the beat overlaps a motion window; such beats are left out of R, HR and PI. */
  motion: boolean;
}

export type PlethVerdict = 'trustworthy' | 'doubtful' | 'unusable';

export interface PlethAnalysis {
  beats: PlethBeat[];
  /** R of each clean beat. */
  rPerBeat: number[];
  rMedian: number | null;
  spo2: number | null;
  curveName: string;
  heartRate: number | null;
  /** Infrared AC/DC × 100, median over clean beats. */
  perfusionIndex: number | null;
  /** Skewness SQI (Elgendi 2016) of the pulse, blood volume upwards, over motion-free windows. */
  skewness: number | null;
  /** Share of one-second windows flagged as motion. */
  motionFraction: number;
  verdict: PlethVerdict;
  /** Why the verdict is not 'trustworthy' (empty when it is). */
  reasons: string[];
  /** Remarks that do not lower the verdict (e.g. a curve value above 100 % reported as 100). */
  notes: string[];
}

/** How far over 100 % a curve value may be and still count as measurement noise around 100 %. */
export const OVER_100_TOLERANCE_PCT = 1;

/** The R at which a curve gives 100 % (found by bisection, so any monotone curve works). */
function lowestR(curve: CalibrationCurve): number {
  let lo = 0;
  let hi = 10;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (curve.spo2FromR(mid) > 100) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

function validateChannel(name: string, values: unknown, length: number | null): number[] {
  if (!Array.isArray(values)) throw new ComputationInputError(`strip.${name}`, 'must be an array of numbers', values);
  if (values.length === 0) throw new ComputationInputError(`strip.${name}`, 'must not be empty', values);
  if (length !== null && values.length !== length) {
    throw new ComputationInputError(
      `strip.${name}`,
      `must have as many samples as strip.red (${length})`,
      values.length,
    );
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v))
      throw new ComputationInputError(`strip.${name}[${i}]`, 'must be a finite number', v);
  }
  return values as number[];
}

/** Centred moving average with prefix sums; the window shrinks at the ends. */
function movingAverage(x: Float64Array, width: number): Float64Array {
  const n = x.length;
  const half = Math.max(0, Math.floor(width / 2));
  const prefix = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) prefix[i + 1] = prefix[i]! + x[i]!;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - half);
    const b = Math.min(n, i + half + 1);
    out[i] = (prefix[b]! - prefix[a]!) / (b - a);
  }
  return out;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

function quantile(sorted: number[], q: number): number {
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (pos - lo);
}

function skewnessOf(values: number[]): number | null {
  const n = values.length;
  if (n < 3) return null;
  let mean = 0;
  for (const v of values) mean += v;
  mean /= n;
  let m2 = 0;
  let m3 = 0;
  for (const v of values) {
    const d = v - mean;
    m2 += d * d;
    m3 += d * d * d;
  }
  m2 /= n;
  m3 /= n;
  if (m2 === 0) return null;
  return m3 / m2 ** 1.5;
}

/**
 * Checks a raw pleth strip the way an oximeter would (common practice):
 * 1. subtract the dark channel from red and infrared, so ambient light cancels;
 * 2. split each channel into DC (centred moving average) and pulsatile AC;
 * 3. find beats as systolic peaks of the infrared pulse (blood volume upwards), by prominence,
 *    with a refractory time from the highest accepted heart rate;
 * 4. per beat, AC = max − min and DC = mean of each (lightly smoothed) channel, R = (AC/DC)red /
 *    (AC/DC)ir; the median R over clean beats gives SpO₂ through `curve`;
 * 5. heart rate from the median beat interval, perfusion index = IR AC/DC × 100, skewness SQI;
 * 6. a verdict with its reasons. Cut-offs are settings (ours; no universal cut-off is published).
 *
 * Throws ComputationInputError for empty or unequal channels, non-finite samples or a bad sample
 * rate. Strips too short or too poor to analyse return verdict 'unusable' with nulls, never a guess.
 */
export function analysePlethStrip(
  strip: PlethStrip,
  curve: CalibrationCurve = beerLambertCurve,
  s?: Partial<PlethSettings>,
): PlethAnalysis {
  const cfg = resolveSettings(DEFAULT_PLETH_SETTINGS, s, 'plethSettings');
  const fs = requirePositive('strip.sampleRateHz', strip.sampleRateHz);
  const redRaw = validateChannel('red', strip.red, null);
  const n = redRaw.length;
  const irRaw = validateChannel('infrared', strip.infrared, n);
  const dark = validateChannel('dark', strip.dark, n);
  if (typeof curve?.spo2FromR !== 'function')
    throw new ComputationInputError('curve', 'must be a calibration curve', curve);

  const reasons: string[] = [];
  const empty = (motionFraction: number, skewness: number | null): PlethAnalysis => ({
    beats: [],
    rPerBeat: [],
    rMedian: null,
    spo2: null,
    curveName: curve.name,
    heartRate: null,
    perfusionIndex: null,
    skewness,
    motionFraction,
    verdict: 'unusable',
    reasons,
    notes: [],
  });

  // 1. Dark subtraction: whatever reaches the detector with the emitters off is not our light.
  const red = new Float64Array(n);
  const ir = new Float64Array(n);
  let minLight = Infinity;
  for (let i = 0; i < n; i++) {
    red[i] = redRaw[i]! - dark[i]!;
    ir[i] = irRaw[i]! - dark[i]!;
    minLight = Math.min(minLight, red[i]!, ir[i]!);
  }
  if (!(minLight > 0)) {
    reasons.push('no emitter light left after subtracting the dark channel (probe off or detector saturated)');
    return empty(0, null);
  }

  // 2. DC by a long centred moving average; the pulse as a fraction of DC, blood volume upwards.
  const dcIr = movingAverage(ir, Math.round(cfg.detrendWindowSec * fs));
  const rawPulse = new Float64Array(n);
  for (let i = 0; i < n; i++) rawPulse[i] = -(ir[i]! - dcIr[i]!) / dcIr[i]!;
  const smoothWidth = Math.max(1, Math.round(cfg.smoothingWindowSec * fs));
  const pulse = movingAverage(rawPulse, smoothWidth);
  const redSmooth = movingAverage(red, smoothWidth);
  const irSmooth = movingAverage(ir, smoothWidth);

  // Motion and flatness on one-second windows of the pulse.
  const win = Math.max(2, Math.round(fs));
  const windowCount = Math.max(1, Math.floor(n / win));
  const ranges: number[] = [];
  for (let w = 0; w < windowCount; w++) {
    let lo = Infinity;
    let hi = -Infinity;
    const end = w === windowCount - 1 ? n : (w + 1) * win;
    for (let i = w * win; i < end; i++) {
      const v = pulse[i]!;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    ranges.push(hi - lo);
  }
  const medianRange = median(ranges);
  if (medianRange * 100 < cfg.flatTracePct) {
    reasons.push(`flat trace: pulsatile range ${(medianRange * 100).toFixed(3)} % of DC, under ${cfg.flatTracePct} %`);
    return empty(0, null);
  }
  const motionWindow = ranges.map(
    (r) => r > cfg.motionRangeFactor * medianRange || r * 100 > cfg.motionMaxPulsatilePct,
  );
  const motionFraction = motionWindow.filter(Boolean).length / windowCount;
  const windowOf = (i: number): number => Math.min(windowCount - 1, Math.floor(i / win));

  const cleanSamples: number[] = [];
  for (let i = 0; i < n; i++) if (!motionWindow[windowOf(i)]) cleanSamples.push(pulse[i]!);
  const skewness = skewnessOf(cleanSamples);

  if (motionFraction > cfg.motionUnusableFraction) {
    reasons.push(
      `motion in ${(motionFraction * 100).toFixed(0)} % of the strip (limit ${(cfg.motionUnusableFraction * 100).toFixed(0)} %)`,
    );
    return empty(motionFraction, skewness);
  }
  if (motionFraction > 0)
    reasons.push(`motion in ${(motionFraction * 100).toFixed(0)} % of the strip; those beats left out`);

  // 3. Beats: local maxima of the pulse, kept by prominence, strongest first, one per refractory time.
  const maxBeatSamples = Math.ceil((60 / cfg.minHeartRate) * fs);
  const refractory = (60 / cfg.maxHeartRate) * fs;
  const minProminence = cfg.beatHeightFraction * medianRange;
  const candidates: { i: number; prominence: number }[] = [];
  for (let i = 1; i < n - 1; i++) {
    const v = pulse[i]!;
    if (!(v > pulse[i - 1]! && v >= pulse[i + 1]!)) continue;
    let leftMin = v;
    for (let j = i - 1; j >= Math.max(0, i - maxBeatSamples) && pulse[j]! <= v; j--)
      leftMin = Math.min(leftMin, pulse[j]!);
    let rightMin = v;
    for (let j = i + 1; j < Math.min(n, i + maxBeatSamples) && pulse[j]! <= v; j++)
      rightMin = Math.min(rightMin, pulse[j]!);
    const prominence = v - Math.max(leftMin, rightMin);
    if (prominence >= minProminence) candidates.push({ i, prominence });
  }
  candidates.sort((a, b) => b.prominence - a.prominence);
  const accepted: number[] = [];
  for (const c of candidates) {
    if (accepted.every((a) => Math.abs(a - c.i) >= refractory)) accepted.push(c.i);
  }
  accepted.sort((a, b) => a - b);
  // Parabolic interpolation puts each peak between samples, so heart rate is not quantised to the sample period.
  const peakTime = (i: number): number => {
    const a = pulse[i - 1]!;
    const b = pulse[i]!;
    const c = pulse[i + 1]!;
    const denom = a - 2 * b + c;
    const offset = denom === 0 ? 0 : (0.5 * (a - c)) / denom;
    return (i + offset) / fs;
  };

  // 4. Per-beat AC and DC on the lightly smoothed channels.
  const beats: PlethBeat[] = [];
  const intervals: number[] = [];
  for (let k = 0; k + 1 < accepted.length; k++) {
    const a = accepted[k]!;
    const b = accepted[k + 1]!;
    if (b - a > maxBeatSamples) continue; // a pause longer than the lowest rate: not one beat
    let rMax = -Infinity;
    let rMin = Infinity;
    let iMax = -Infinity;
    let iMin = Infinity;
    let rSum = 0;
    let iSum = 0;
    for (let i = a; i <= b; i++) {
      const rv = redSmooth[i]!;
      const iv = irSmooth[i]!;
      if (rv > rMax) rMax = rv;
      if (rv < rMin) rMin = rv;
      if (iv > iMax) iMax = iv;
      if (iv < iMin) iMin = iv;
      if (i < b) {
        rSum += rv;
        iSum += iv;
      }
    }
    const dcR = rSum / (b - a);
    const dcI = iSum / (b - a);
    const acR = rMax - rMin;
    const acI = iMax - iMin;
    let motion = false;
    for (let w = windowOf(a); w <= windowOf(b); w++) if (motionWindow[w]) motion = true;
    const startSec = peakTime(a);
    const endSec = peakTime(b);
    beats.push({ startSec, endSec, acRed: acR, dcRed: dcR, acIr: acI, dcIr: dcI, r: acR / dcR / (acI / dcI), motion });
    if (!motion) intervals.push(endSec - startSec);
  }
  const clean = beats.filter((b) => !b.motion && Number.isFinite(b.r) && b.acIr > 0);
  if (clean.length < cfg.minBeats) {
    reasons.push(`only ${clean.length} clean beat(s) found; at least ${cfg.minBeats} needed`);
    const result = empty(motionFraction, skewness);
    result.beats = beats;
    return result;
  }

  const rPerBeat = clean.map((b) => b.r);
  const rMedian = median(rPerBeat);
  const sortedR = [...rPerBeat].sort((a, b) => a - b);
  const spread = (quantile(sortedR, 0.75) - quantile(sortedR, 0.25)) / rMedian;
  const heartRate = 60 / median(intervals);
  const perfusionIndex = median(clean.map((b) => (b.acIr / b.dcIr) * 100));

  let unusable = false;
  let spo2: number | null = curve.spo2FromR(rMedian);
  const notes: string[] = [];
  if (spo2 > 100 + OVER_100_TOLERANCE_PCT) {
    // R below the lowest the curve allows (its value at 100 %): the saturation cannot be read from
    // this strip. Clamping it to 100 % and calling it trustworthy would hide a probe problem.
    reasons.push(
      `R ${rMedian.toFixed(3)} is below the lowest the curve covers (${lowestR(curve).toFixed(3)} at 100 %): SpO₂ cannot be read from this strip; reported as 100 % at most`,
    );
    spo2 = 100;
  } else if (spo2 > 100) {
    // Within measurement noise of 100 %: oximeters show 100.
    notes.push(`curve ${curve.name} gives ${spo2.toFixed(1)} % at R ${rMedian.toFixed(3)}; reported as 100 %`);
    spo2 = 100;
  }
  if (!Number.isFinite(spo2) || spo2 < 0) {
    reasons.push(`R ${rMedian.toFixed(3)} maps outside 0–100 % on curve ${curve.name}`);
    spo2 = null;
    unusable = true;
  } else if (spo2 < OXIMETER_CALIBRATED_RANGE_PCT.low) {
    reasons.push(
      `SpO₂ under ${OXIMETER_CALIBRATED_RANGE_PCT.low} %: outside the range oximeters are calibrated for (ISO 80601-2-61)`,
    );
  }
  if (perfusionIndex < cfg.minPerfusionIndexPct) {
    reasons.push(`perfusion index ${perfusionIndex.toFixed(2)} % under ${cfg.minPerfusionIndexPct} %`);
  }
  if (skewness !== null && skewness < cfg.skewnessDoubtfulBelow) {
    reasons.push(`skewness ${skewness.toFixed(2)} under ${cfg.skewnessDoubtfulBelow} (signal quality)`);
  }
  if (spread > cfg.maxRSpread) {
    reasons.push(
      `R varies between beats (spread ${(spread * 100).toFixed(0)} %, limit ${(cfg.maxRSpread * 100).toFixed(0)} %)`,
    );
  }
  const verdict: PlethVerdict = unusable ? 'unusable' : reasons.length > 0 ? 'doubtful' : 'trustworthy';
  return {
    beats,
    rPerBeat,
    rMedian,
    spo2,
    curveName: curve.name,
    heartRate,
    perfusionIndex,
    skewness,
    motionFraction,
    verdict,
    reasons,
    notes,
  };
}
