/** JSON shape of `POST /api/pleth/analyse` and of an attached check, shared with the strip-check island. */
import type { PlethAnalysis } from '~/lib/oxygenation/index.ts';

export interface StripResult {
  analysis: PlethAnalysis;
  curve: { name: string; source: string };
  sampleRateHz: number;
  samples: number;
  durationSec: number;
  /** Red and infrared after dark subtraction (what the analysis works on), thinned for drawing. */
  wave: { t: number[]; red: number[]; infrared: number[] };
}
