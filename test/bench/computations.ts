/**
 * Throughput of the oxygenation hot paths over a realistic unit-sized load:
 * 30 beds × 72 h of one-per-second device readings (7,776,000 readings), generated
 * deterministically. Run: node --import tsx test/bench/computations.ts
 *
 * Readings are generated one bed at a time (a bed is what the app computes over), so the whole
 * load never sits in memory at once; only the computations are timed, not the generation.
 * Target: ≥ 5 million readings/s for band compliance on one core.
 */
import {
  bandCompliance,
  detectConcerns,
  keepBelowBandRunEdges,
  lttb,
  type BandOrder,
  type Reading,
  type TraceQuality,
} from '../../src/lib/oxygenation/index.ts';
import { seededRandom } from '../../src/lib/oxygenation/test-fixtures.ts';

const BEDS = 30;
const HOURS = 72;
const PER_BED = HOURS * 3600;
const START = Date.UTC(2025, 0, 6); // fixed, so every run sees the same data
const CHART_POINTS = 2000;

/** One bed's readings: a drifting saturation with desaturations, artefact spells and FiO₂ changes. */
function generateBed(bed: number): { readings: Reading[]; orders: BandOrder[] } {
  const rnd = seededRandom(0x5eed + bed);
  const readings: Reading[] = new Array(PER_BED);
  let level = 94;
  let dipLeft = 0;
  let dipDepth = 0;
  let artefactLeft = 0;
  let fio2 = 0.28 + 0.02 * (bed % 5);
  for (let i = 0; i < PER_BED; i++) {
    level += (95 - level) * 0.001 + (rnd() - 0.5) * 0.2;
    if (dipLeft === 0 && rnd() < 1 / 5400) {
      dipLeft = 60 + Math.floor(rnd() * 900);
      dipDepth = 3 + rnd() * 10;
    }
    if (artefactLeft === 0 && rnd() < 1 / 7200) artefactLeft = 30 + Math.floor(rnd() * 600);
    if (i % 3600 === 0 && rnd() < 0.2) fio2 = Math.min(0.6, Math.max(0.21, fio2 + (rnd() < 0.5 ? -0.05 : 0.05)));
    let spo2 = level - (dipLeft > 0 ? dipDepth : 0);
    let trace: TraceQuality = 'clean';
    if (artefactLeft > 0) {
      trace = rnd() < 0.7 ? 'noisy' : 'weak';
      spo2 -= rnd() * 15;
      artefactLeft--;
    }
    if (dipLeft > 0) dipLeft--;
    readings[i] = {
      at: START + i * 1000,
      spo2: Math.max(50, Math.min(100, Math.round(spo2))),
      heartRate: 70 + Math.round(rnd() * 30),
      fio2,
      fio2Estimated: false,
      device: fio2 > 0.21 ? 'high_flow_nasal' : 'room_air',
      trace,
      perfusionIndex: trace === 'clean' ? 1 + rnd() * 3 : 0.2 + rnd(),
      source: 'device',
    };
  }
  const orders: BandOrder[] = [
    { from: START - 3_600_000, low: 92, high: 96 },
    { from: START + 24 * 3_600_000, low: 94, high: 98 },
    { from: START + 48 * 3_600_000 + 1_800_000, low: 88, high: 92 },
  ];
  return { readings, orders };
}

const timings = { compliance: 0, concerns: 0, downsample: 0 };
let total = 0;
let checksum = 0; // uses every result so no work can be optimised away
let belowMinutes = 0;
let escalations = 0;
let chartPoints = 0;
const genStart = performance.now();
let genMs = 0;

for (let bed = 0; bed < BEDS; bed++) {
  const g0 = performance.now();
  const { readings, orders } = generateBed(bed);
  genMs += performance.now() - g0;
  total += readings.length;
  const window = { from: START, to: START + PER_BED * 1000 };

  let t = performance.now();
  const compliance = bandCompliance(readings, orders, window);
  timings.compliance += performance.now() - t;
  belowMinutes += compliance.belowMin;
  checksum += compliance.burdenPctMin;

  t = performance.now();
  const concerns = detectConcerns(readings, orders[orders.length - 1]!, window.to);
  timings.concerns += performance.now() - t;
  if (concerns.belowBand) escalations++;
  checksum += concerns.cannotVerify ? 1 : 0;

  t = performance.now();
  const chart = lttb(
    readings,
    CHART_POINTS,
    (r) => r.at,
    (r) => r.spo2 ?? 0,
    keepBelowBandRunEdges(readings, orders),
  );
  timings.downsample += performance.now() - t;
  chartPoints += chart.length;
}

const rate = (ms: number) => ((total / ms) * 1000) / 1e6;
const line = (name: string, ms: number) =>
  `${name.padEnd(40)} ${rate(ms).toFixed(1).padStart(6)} M readings/s  (${(ms / 1000).toFixed(2)} s)`;
console.log(
  `readings: ${total.toLocaleString('en-GB')} (${BEDS} beds × ${HOURS} h × 1/s), generated in ${(genMs / 1000).toFixed(1)} s`,
);
console.log(line('band compliance', timings.compliance));
console.log(line('sustained-below detection', timings.concerns));
console.log(line(`downsampling (LTTB → ${CHART_POINTS} + run edges)`, timings.downsample));
console.log(
  `band compliance target ≥ 5 M readings/s: ${rate(timings.compliance) >= 5 ? 'met' : 'NOT met'}; ` +
    `below band ${belowMinutes.toFixed(0)} min over all beds, ${escalations} beds escalated at the end, ` +
    `${chartPoints} chart points, checksum ${checksum.toFixed(1)}; wall ${((performance.now() - genStart) / 1000).toFixed(1)} s`,
);
const heap = process.memoryUsage();
console.log(
  `memory: heap used ${(heap.heapUsed / 2 ** 20).toFixed(0)} MiB, rss ${(heap.rss / 2 ** 20).toFixed(0)} MiB`,
);
