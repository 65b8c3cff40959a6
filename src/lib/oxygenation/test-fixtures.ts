/**
 * Deterministic generators for the oxygenation tests and the benchmark. Not used by the app.
 * Every strip is built from the Beer–Lambert forward model with Prahl's coefficients, so the
 * expected R and saturation come from the physics, not from invented numbers.
 */
import { beerLambertCurve, type PlethStrip } from './pleth';

import { seededRandom } from '~/lib/random';

export { seededRandom };

/**
 * Arterial blood-volume pulse over one cycle (phase 0–1), peak 1: a sharp systolic wave and a
 * smaller, later diastolic wave, as a pulse looks with blood volume upwards.
 */
export function pulseShape(phase: number): number {
  const wave = (centre: number, width: number): number => {
    let d = Math.abs(phase - centre);
    d = Math.min(d, 1 - d);
    return Math.exp(-((d / width) ** 2));
  };
  return (wave(0.15, 0.07) + 0.3 * wave(0.45, 0.09)) / 1.0;
}

export interface StripOptions {
  /** Ratio of ratios R to draw instead of the one Beer–Lambert gives at spo2Pct (for out-of-range strips). */
  ratio?: number;
  spo2Pct: number;
  heartRate: number;
  sampleRateHz?: number;
  seconds?: number;
  /** Infrared perfusion index, % (AC/DC × 100). */
  perfusionIndexPct?: number;
  /** Light reaching the detector with no pulse, counts. */
  dcRed?: number;
  dcIr?: number;
  /** Detector offset seen in every channel, counts. */
  darkOffset?: number;
  /** Ambient light at time t (s), added to red, infrared and dark alike. */
  ambient?: (tSec: number) => number;
  /** Extra signal at time t (s) added to red and infrared only (motion artefact). */
  artefact?: (tSec: number) => number;
  /** Gaussian-ish detector noise, counts (sum of uniforms), per channel. */
  noiseCounts?: number;
  seed?: number;
  /** Shape of the pulse; defaults to pulseShape. */
  shape?: (phase: number) => number;
}

/**
 * A raw strip from Beer–Lambert: I = DC · exp(−μ·Δd(t)), with μ₆₆₀/μ₉₄₀ = the R that Prahl's
 * coefficients predict at `spo2Pct`. The pulse depth is scaled so infrared AC/DC ≈ the asked PI.
 */
export function synthesiseStrip(o: StripOptions): PlethStrip {
  const fs = o.sampleRateHz ?? 100;
  const n = Math.round((o.seconds ?? 10) * fs);
  const r = o.ratio ?? beerLambertCurve.rFromSpo2(o.spo2Pct);
  const depthIr = (o.perfusionIndexPct ?? 2) / 100;
  const depthRed = depthIr * r;
  const dcRed = o.dcRed ?? 40_000;
  const dcIr = o.dcIr ?? 60_000;
  const offset = o.darkOffset ?? 800;
  const shape = o.shape ?? pulseShape;
  const rnd = seededRandom(o.seed ?? 1);
  const noise = (): number => (rnd() + rnd() + rnd() - 1.5) * 2 * (o.noiseCounts ?? 0);
  const red: number[] = [];
  const infrared: number[] = [];
  const dark: number[] = [];
  const beatHz = o.heartRate / 60;
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    const phase = (t * beatHz + 0.37) % 1;
    const volume = shape(phase);
    const amb = (o.ambient?.(t) ?? 0) + offset;
    const art = o.artefact?.(t) ?? 0;
    red.push(dcRed * Math.exp(-depthRed * volume) + amb + art + noise());
    infrared.push(dcIr * Math.exp(-depthIr * volume) + amb + art + noise());
    dark.push(amb + noise());
  }
  return { sampleRateHz: fs, red, infrared, dark };
}
