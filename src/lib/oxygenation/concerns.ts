import { placeInBand, type BandStateName } from './band-state.ts';
import { ComputationInputError } from './errors';
import { ROOM_AIR_FIO2 } from './constants';
import {
  DEFAULT_COMPLIANCE_SETTINGS,
  DEFAULT_ESCALATION_SETTINGS,
  resolveSettings,
  type ComplianceSettings,
  type EscalationSettings,
} from './settings';
import { trustedWith } from './trust';
import type { Band, OxygenDevice, Reading } from './types';
import { maxGapMsFor, sortedUpTo, validateMoment } from './validate';
import { OXYGEN_DEVICES } from './types';

const MS_PER_MIN = 60_000;

export interface BelowBandConcern {
  severity: 'standard' | 'urgent';
  /** Which rule was met first: N consecutive charted readings, or the device dwell. */
  rule: 'charted_consecutive' | 'device_dwell';
  /** Time of the first / last trusted below-band reading of the current run. */
  runStart: number;
  runEnd: number;
  firstReading: Reading;
  lastReading: Reading;
  /** Lowest trusted SpO₂ of the run. */
  nadir: number;
  /** Minutes from runStart to `now`. */
  sinceMin: number;
  /** When the rule was first met. */
  metAt: number;
  /** Trusted charted readings below band in the run. */
  chartedCount: number;
  /** Why the run is urgent (empty when standard). */
  urgentReasons: string[];
}

export interface CannotVerifyConcern {
  /** Time of the first untrusted reading after the last trusted one (or of the first reading). */
  since: number;
  sinceMin: number;
  untrustedReadings: number;
  lastTrustedAt: number | null;
  lastReading: Reading;
}

export interface AboveOnOxygenConcern {
  since: number;
  sinceMin: number;
  /** Minutes between the first and last trusted above-band readings on oxygen. */
  spanMin: number;
  lastReading: Reading;
  /** FiO₂ in force at the last reading (null when only the device is known). */
  fio2: number | null;
  device: OxygenDevice | null;
}

export interface Concerns {
  belowBand: BelowBandConcern | null;
  cannotVerify: CannotVerifyConcern | null;
  aboveOnOxygen: AboveOnOxygenConcern | null;
}

/** FiO₂ and device carried forward along the readings, so device rows without FiO₂ still know. */
class OxygenTracker {
  fio2: number | null = null;
  device: OxygenDevice | null = null;

  update(r: Reading, index: number): void {
    const device = r.device;
    if (device !== undefined && device !== null) {
      if (!OXYGEN_DEVICES.includes(device)) {
        throw new ComputationInputError(`readings[${index}].device`, 'is not a known oxygen device', device);
      }
      if (device !== this.device) this.fio2 = device === 'room_air' ? ROOM_AIR_FIO2 : null;
      this.device = device;
    }
    const fio2 = r.fio2;
    if (fio2 !== undefined && fio2 !== null) {
      if (!(fio2 >= ROOM_AIR_FIO2 && fio2 <= 1)) {
        throw new ComputationInputError(`readings[${index}].fio2`, 'must be a fraction between 0.21 and 1', fio2);
      }
      this.fio2 = fio2;
    }
  }

  /** On oxygen when FiO₂ in force is above room air, or when FiO₂ is unknown but a device other than room air is charted. */
  get onOxygen(): boolean {
    if (this.fio2 !== null) return this.fio2 > ROOM_AIR_FIO2;
    return this.device !== null && this.device !== 'room_air';
  }
}

/**
 * The escalation checks for one patient, evaluated at `now`, in one forward pass.
 *
 * `readings` are sorted by time; readings after `now` are ignored (not yet seen). Every reading is
 * judged against `band` (the band in force now): pass readings since the current order began when
 * older readings should not be re-judged. With `band` null only cannot-verify is evaluated.
 *
 * - Gaps: every reading stands for at most its source's validity window (compliance settings: 75 min
 *   charted, 2 min device/import — the rule bandState and band compliance use); a reading after a
 *   stretch that no reading covers starts every run afresh.
 * - belowBand: the current run of trusted readings below the lower limit — a run is ended by a gap or
 *   by a trusted reading that is not below band; untrusted readings neither end nor extend it, so a
 *   poor trace never hides a desaturation and never causes one. The concern stands when the run
 *   holds `consecutiveCharted` trusted charted readings, or trusted device/import readings span
 *   `deviceDwellMin` (first to last such reading). Urgent when any trusted reading of the run is
 *   `urgentMarginPoints` or more under the lower limit, or under `urgentFloorPct`.
 * - cannotVerify: the latest readings are all untrusted and the first of them is at least
 *   `cannotVerifyMin` before `now` (a probe check for the bedside nurse).
 * - aboveOnOxygen: trusted readings above the upper limit while on oxygen (FiO₂ > 0.21 carried
 *   forward, or a non-room-air device when FiO₂ is unknown), spanning `aboveOnOxygenMin`; ended
 *   by a trusted reading that is not above band or is on room air.
 */
export function detectConcerns(
  readings: readonly Reading[],
  band: Band | null,
  now: number,
  s?: Partial<EscalationSettings>,
): Concerns {
  const cfg = resolveSettings(DEFAULT_ESCALATION_SETTINGS, s, 'escalationSettings');
  if (!Number.isInteger(cfg.consecutiveCharted) || cfg.consecutiveCharted < 1) {
    throw new ComputationInputError(
      'escalationSettings.consecutiveCharted',
      'must be a whole number of at least 1',
      cfg.consecutiveCharted,
    );
  }
  validateMoment(band, now);
  const low = band === null ? NaN : band.low;
  const high = band === null ? NaN : band.high;
  const dwellMs = cfg.deviceDwellMin * MS_PER_MIN;
  const urgentBelow = low - cfg.urgentMarginPoints; // SpO₂ ≤ this is "≥ margin below"
  const floor = cfg.urgentFloorPct;
  const minPi = cfg.minPerfusionIndexPct;
  const oxygen = new OxygenTracker();
  // One rule for runs across gaps (shared with bandState and band compliance): a reading stands for
  // at most its source's validity window; a reading after a stretch no reading covers starts every
  // run afresh, so time past the window is "no reading" and counts toward no dwell.
  const chartedMs = DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin * MS_PER_MIN;
  const deviceMs = DEFAULT_COMPLIANCE_SETTINGS.deviceMaxGapMin * MS_PER_MIN;
  const importMs = DEFAULT_COMPLIANCE_SETTINGS.importMaxGapMin * MS_PER_MIN;
  let coveredUntil = -Infinity;
  let trustedCoveredUntil = -Infinity;

  // Below-band run.
  let runFirst = -1;
  let runLast = -1;
  let runCharted = 0;
  let runDeviceStart = NaN;
  let runNadir = Infinity;
  let runMetAt = NaN;
  let runRule: BelowBandConcern['rule'] = 'charted_consecutive';
  let runMarginHit = false;
  let runFloorHit = false;
  // Untrusted streak.
  let streakFirst = -1;
  let streakCount = 0;
  let lastTrustedAt = NaN;
  // Above-band-on-oxygen run.
  let aboveFirst = -1;
  let aboveLast = -1;

  const count = sortedUpTo(readings, now);
  const last = count - 1;
  for (let i = 0; i < count; i++) {
    const r = readings[i]!;
    const at = r.at;
    const trusted = trustedWith(r, minPi, i);
    const source = r.source;
    const stands = maxGapMsFor(source, chartedMs, deviceMs, importMs, i); // also validates the source
    if (at > coveredUntil) {
      streakFirst = -1;
      streakCount = 0;
    }
    coveredUntil = at + stands; // a newer reading ends an older one's carry, as in band compliance
    oxygen.update(r, i);
    if (!trusted) {
      if (streakFirst < 0) streakFirst = i;
      streakCount++;
      continue;
    }
    // The below- and above-band runs are carried by trusted readings alone: an untrusted reading in
    // between must not end a trusted reading's carry, or a poor trace would hide a real desaturation.
    if (at > trustedCoveredUntil) {
      runFirst = -1;
      aboveFirst = -1;
    }
    trustedCoveredUntil = at + stands;
    streakFirst = -1;
    streakCount = 0;
    lastTrustedAt = at;
    if (band === null) continue;
    const spo2 = r.spo2 as number;

    if (spo2 < low) {
      if (runFirst < 0) {
        runFirst = i;
        runCharted = 0;
        runDeviceStart = NaN;
        runNadir = Infinity;
        runMetAt = NaN;
        runMarginHit = false;
        runFloorHit = false;
      }
      runLast = i;
      if (spo2 < runNadir) runNadir = spo2;
      if (spo2 <= urgentBelow) runMarginHit = true;
      if (spo2 < floor) runFloorHit = true;
      if (source === 'charted') {
        runCharted++;
        if (runCharted >= cfg.consecutiveCharted && Number.isNaN(runMetAt)) {
          runMetAt = at;
          runRule = 'charted_consecutive';
        }
      } else {
        if (Number.isNaN(runDeviceStart)) runDeviceStart = at;
        if (at - runDeviceStart >= dwellMs && Number.isNaN(runMetAt)) {
          runMetAt = at;
          runRule = 'device_dwell';
        }
      }
    } else {
      runFirst = -1;
    }

    if (spo2 > high && oxygen.onOxygen) {
      if (aboveFirst < 0) aboveFirst = i;
      aboveLast = i;
    } else {
      aboveFirst = -1;
    }
  }

  let belowBand: BelowBandConcern | null = null;
  if (runFirst >= 0 && !Number.isNaN(runMetAt)) {
    const first = readings[runFirst]!;
    const lastR = readings[runLast]!;
    const urgentReasons: string[] = [];
    if (runMarginHit)
      urgentReasons.push(`a reading ${cfg.urgentMarginPoints} or more points below the lower limit ${low} %`);
    if (runFloorHit) urgentReasons.push(`a reading under ${floor} %`);
    belowBand = {
      severity: urgentReasons.length > 0 ? 'urgent' : 'standard',
      rule: runRule,
      runStart: first.at,
      runEnd: lastR.at,
      firstReading: first,
      lastReading: lastR,
      nadir: runNadir,
      sinceMin: (now - first.at) / MS_PER_MIN,
      metAt: runMetAt,
      chartedCount: runCharted,
      urgentReasons,
    };
  }

  let cannotVerify: CannotVerifyConcern | null = null;
  if (streakFirst >= 0) {
    const since = readings[streakFirst]!.at;
    if (now - since >= cfg.cannotVerifyMin * MS_PER_MIN) {
      cannotVerify = {
        since,
        sinceMin: (now - since) / MS_PER_MIN,
        untrustedReadings: streakCount,
        lastTrustedAt: Number.isNaN(lastTrustedAt) ? null : lastTrustedAt,
        lastReading: readings[last]!,
      };
    }
  }

  let aboveOnOxygen: AboveOnOxygenConcern | null = null;
  if (aboveFirst >= 0) {
    const since = readings[aboveFirst]!.at;
    const lastAbove = readings[aboveLast]!;
    const spanMs = lastAbove.at - since;
    if (spanMs >= cfg.aboveOnOxygenMin * MS_PER_MIN) {
      aboveOnOxygen = {
        since,
        sinceMin: (now - since) / MS_PER_MIN,
        spanMin: spanMs / MS_PER_MIN,
        lastReading: lastAbove,
        fio2: oxygen.fio2,
        device: oxygen.device,
      };
    }
  }

  return { belowBand, cannotVerify, aboveOnOxygen };
}

export type { BandStateName } from './band-state.ts';

export interface BandStateResult {
  state: BandStateName;
  /** When the current state began (epoch ms), or null when there is nothing to date it from. */
  since: number | null;
  /** Minutes from `since` to `now` (null with `since`), for "below band 18 min". */
  sinceMin: number | null;
  /** Latest reading at or before `now`, if any. */
  latest: Reading | null;
  /** Whether oxygen is in force at the latest reading (FiO₂ > 0.21 or a non-room-air device). */
  onOxygen: boolean;
}

/**
 * The board tile's state now, and since when.
 *
 * - no_band: `band` is null. no_reading: no reading, or the latest reading's carry-forward
 *   (compliance settings: 75 min charted, 2 min device/import) ended before `now`; since = when
 *   it ended. untrusted: the latest reading is untrusted; since = first of the untrusted streak.
 * - below / in / above: from the latest trusted reading; since = the first trusted reading of the
 *   unbroken run in that state. Untrusted readings do not break the run (as in detectConcerns);
 *   a trusted reading in another state or a gap with no reading does.
 * All readings are judged against `band`; readings after `now` are ignored.
 */
export function bandState(
  readings: readonly Reading[],
  band: Band | null,
  now: number,
  s?: Partial<ComplianceSettings>,
): BandStateResult {
  const cfg = resolveSettings(DEFAULT_COMPLIANCE_SETTINGS, s, 'complianceSettings');
  validateMoment(band, now);
  const chartedMs = cfg.chartedMaxGapMin * MS_PER_MIN;
  const deviceMs = cfg.deviceMaxGapMin * MS_PER_MIN;
  const importMs = cfg.importMaxGapMin * MS_PER_MIN;
  const oxygen = new OxygenTracker();

  let coveredUntil = -Infinity;
  let trustedState: BandStateName = 'no_reading';
  let trustedSince = NaN;
  let untrustedSince = NaN;
  let lastTrusted = false;
  const count = sortedUpTo(readings, now);
  const last = count - 1;
  for (let i = 0; i < count; i++) {
    const r = readings[i]!;
    const at = r.at;
    const trusted = trustedWith(r, cfg.minPerfusionIndexPct, i);
    oxygen.update(r, i);
    const gap = maxGapMsFor(r.source, chartedMs, deviceMs, importMs, i);
    if (at > coveredUntil) {
      // A stretch with no reading breaks every run.
      trustedState = 'no_reading';
      untrustedSince = NaN;
    }
    coveredUntil = at + gap; // a newer reading ends an older one's carry, as in band compliance
    lastTrusted = trusted;
    if (!trusted) {
      if (Number.isNaN(untrustedSince)) untrustedSince = at;
      continue;
    }
    untrustedSince = NaN;
    if (band === null) continue;
    const spo2 = r.spo2 as number;
    const state: BandStateName = placeInBand(spo2, band);
    if (state !== trustedState) {
      trustedState = state;
      trustedSince = at;
    }
  }

  const latest = last >= 0 ? readings[last]! : null;
  const onOxygen = oxygen.onOxygen;
  const result = (state: BandStateName, since: number | null): BandStateResult => ({
    state,
    since,
    sinceMin: since === null ? null : (now - since) / MS_PER_MIN,
    latest,
    onOxygen,
  });
  if (band === null) return result('no_band', null);
  if (latest === null) return result('no_reading', null);
  if (now >= coveredUntil) return result('no_reading', coveredUntil);
  if (!lastTrusted) return result('untrusted', untrustedSince);
  return result(trustedState, trustedSince);
}
