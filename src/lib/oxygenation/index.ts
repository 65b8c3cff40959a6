/**
 * Ebbwatch oxygenation computations: pure functions, no I/O, no clock (time is passed in as epoch
 * milliseconds). Defaults are settings (settings.ts), not clinical advice; published constants
 * are pinned with their sources in constants.ts.
 */
export * from './types';
export * from './errors';
export * from './constants';
export * from './settings';
export { isTrusted, untrustedReason } from './trust';
export { bandCompliance, type BandComplianceResult } from './compliance';
export {
  detectConcerns,
  bandState,
  type Concerns,
  type BelowBandConcern,
  type CannotVerifyConcern,
  type AboveOnOxygenConcern,
  type BandStateName,
  type BandStateResult,
} from './concerns';
export {
  sfRatio,
  sfFromPf,
  pfFromSf,
  roxIndex,
  interpretRox,
  estimateFio2,
  type Refusal,
  type Fio2Estimate,
  type RoxCheckpointHours,
  type RoxInterpretation,
} from './indices';
export {
  asConsciousness,
  CONSCIOUSNESS,
  news2,
  news2Response,
  roundHalfUp,
  type Consciousness,
  type News2Observations,
  type News2Parameter,
  type News2Response,
  type News2Result,
} from './news2';
export { severinghausSaturation, ellisPao2, imputedPf, oxygenContent } from './dissociation';
export { desaturationEvents, type DesaturationEvent, type DesaturationResult } from './desaturation';
export { lttb, belowBandRunEdges, keepBelowBandRunEdges } from './downsample';
export {
  analysePlethStrip,
  beerLambertCurve,
  linearApproxCurve,
  type CalibrationCurve,
  type PlethStrip,
  type PlethBeat,
  type PlethVerdict,
  type PlethAnalysis,
} from './pleth';
