/**
 * Invented example pleth strips for the strip check page (public/strips/*.csv, written by
 * docker-free-scripts/make-strips.ts). Raw counts from Beer–Lambert: each channel is
 * I = I₀·exp(−k·v(t)) with the red/infrared absorbance ratio R that Prahl's extinction
 * coefficients give at the chosen saturation (beerLambertCurve.rFromSpo2), plus ambient light
 * and a detector offset that the dark channel also sees. Deterministic (seeded).
 */
import { beerLambertCurve } from '~/lib/oxygenation/pleth.ts';

export interface ExampleStripSpec {
  name: 'clean' | 'motion' | 'low-perfusion';
  title: string;
  spo2: number;
  heartRate: number;
  /** Infrared pulsatile depth, % of DC. */
  perfusionPct: number;
  noise: number;
  /** Seconds (from, to) where the patient moves: large slow swings added to both emitters. */
  movement: [number, number][];
}

export const EXAMPLE_STRIPS: ExampleStripSpec[] = [
  {
    name: 'clean',
    title: 'Clean trace, warm finger',
    spo2: 97,
    heartRate: 74,
    perfusionPct: 3.2,
    noise: 6,
    movement: [],
  },
  {
    name: 'motion',
    title: 'Hand moving during the strip',
    spo2: 95,
    heartRate: 92,
    perfusionPct: 2.4,
    noise: 8,
    movement: [
      [3.2, 4.5],
      [9.1, 9.9],
    ],
  },
  {
    name: 'low-perfusion',
    title: 'Cold hands, weak pulse',
    spo2: 93,
    heartRate: 66,
    perfusionPct: 0.28,
    noise: 3,
    movement: [],
  },
];

export const EXAMPLE_RATE_HZ = 100;
export const EXAMPLE_SECONDS = 16;

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    // xorshift32: enough for invented noise.
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 4294967296;
  };
}

/** Blood volume over one beat (phase 0–1): a quick rise, a notch and a slower second hump. */
function beatVolume(phase: number): number {
  const bump = (c: number, w: number) => Math.exp(-(((phase - c) / w) ** 2));
  return bump(0.18, 0.08) + 0.35 * bump(0.42, 0.1) + 0.35 * bump(1.18, 0.08);
}

export function exampleStripCsv(spec: ExampleStripSpec, seed = 7): string {
  const rand = rng(seed + spec.name.length * 1009);
  const gauss = () => (rand() + rand() + rand() + rand() - 2) * spec.noise;
  const r = beerLambertCurve.rFromSpo2(spec.spo2);
  const kIr = spec.perfusionPct / 100;
  const kRed = kIr * r;
  const red0 = 36_000;
  const ir0 = 52_000;
  const offset = 650;
  const lines = ['time,red,infrared,dark'];
  const n = EXAMPLE_SECONDS * EXAMPLE_RATE_HZ;
  let phase = 0.3;
  for (let i = 0; i < n; i++) {
    const t = i / EXAMPLE_RATE_HZ;
    // A little beat-to-beat variability, as in any real pulse.
    phase += (spec.heartRate / 60 / EXAMPLE_RATE_HZ) * (1 + 0.03 * Math.sin(t * 1.7));
    const v = beatVolume(phase % 1);
    // Room light flickers slowly; the dark channel sees it too, so subtraction removes it.
    const ambient = offset + 900 + 400 * Math.sin(2 * Math.PI * 0.13 * t);
    let move = 0;
    for (const [a, b] of spec.movement) {
      if (t >= a && t <= b) move += 9000 * Math.sin((Math.PI * (t - a)) / (b - a)) * Math.sin(2 * Math.PI * 2.7 * t);
    }
    const red = red0 * Math.exp(-kRed * v) + ambient + move + gauss();
    const ir = ir0 * Math.exp(-kIr * v) + ambient + move * 1.3 + gauss();
    const dark = ambient + gauss();
    lines.push(`${t.toFixed(2)},${Math.round(red)},${Math.round(ir)},${Math.round(dark)}`);
  }
  return `${lines.join('\n')}\n`;
}
