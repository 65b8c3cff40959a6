import { ComputationInputError } from './errors';
import { DEFAULT_DESATURATION_SETTINGS, resolveSettings, type DesaturationSettings } from './settings';

export interface DesaturationEvent {
  /** Time of the first sample at or below baseline − drop. */
  start: number;
  /** Time of the first recovered sample (or of the last sample of the event when data stop). */
  end: number;
  /** Lowest SpO₂ of the event. */
  nadir: number;
  /** Running baseline the event was measured from (mean of the preceding window, events excluded). */
  baseline: number;
  /** baseline − nadir, SpO₂ points. */
  drop: number;
}

export interface DesaturationResult {
  events: DesaturationEvent[];
  /** Events per hour of monitored time (an oxygen desaturation index); 0 when nothing was monitored. */
  perHour: number;
  /** Time covered by samples, gaps longer than maxGapSec left out, minutes. */
  monitoredMin: number;
}

/**
 * Desaturation events in continuous SpO₂ (AASM scoring manual: a fall of ≥ 3 % (rule 1A) or
 * ≥ 4 % (rule 1B) from baseline; the drop is a setting, 3 by default).
 *
 * Baseline: mean of the samples in the `baselineWindowSec` before each sample, excluding samples
 * that belonged to an event (so one event does not drag the baseline down for the next). No
 * baseline, no detection: the first window and the window after a gap only build the baseline.
 * An event starts at the first sample ≤ baseline − drop, keeps that baseline while it lasts, and
 * ends at the first sample above it. Events shorter than `minDurationSec` are dropped. A gap
 * longer than `maxGapSec` closes an open event at its last sample and restarts the baseline.
 *
 * Samples must be sorted with finite times and SpO₂ in 0–100 (ComputationInputError otherwise);
 * an empty array gives no events, perHour 0.
 */
export function desaturationEvents(
  readings: readonly { at: number; spo2: number }[],
  s?: Partial<DesaturationSettings>,
): DesaturationResult {
  const cfg = resolveSettings(DEFAULT_DESATURATION_SETTINGS, s, 'desaturationSettings');
  if (cfg.dropPct <= 0)
    throw new ComputationInputError('desaturationSettings.dropPct', 'must be greater than zero', cfg.dropPct);
  const windowMs = cfg.baselineWindowSec * 1000;
  const maxGapMs = cfg.maxGapSec * 1000;
  const minDurMs = cfg.minDurationSec * 1000;
  const n = readings.length;
  const inEvent = new Uint8Array(n);
  const events: DesaturationEvent[] = [];

  let windowStart = 0; // first index still inside the baseline window
  let windowSum = 0; // sum and count of non-event samples in [windowStart, i)
  let windowCount = 0;
  let segmentStart = 0; // first index after the latest gap
  let monitoredMs = 0;

  let open = false;
  let evStart = 0;
  let evNadir = 0;
  let evBaseline = 0;
  let evLastAt = 0;
  const close = (endAt: number): void => {
    if (endAt - evStart >= minDurMs) {
      events.push({ start: evStart, end: endAt, nadir: evNadir, baseline: evBaseline, drop: evBaseline - evNadir });
    }
    open = false;
  };

  let prevAt = -Infinity;
  for (let i = 0; i < n; i++) {
    const r = readings[i]!;
    const at = r.at;
    const spo2 = r.spo2;
    if (!(at >= prevAt && at - at === 0)) {
      throw new ComputationInputError(`readings[${i}].at`, 'must be a finite time, sorted ascending', at);
    }
    if (!(spo2 >= 0 && spo2 <= 100)) {
      throw new ComputationInputError(`readings[${i}].spo2`, 'must be between 0 and 100', spo2);
    }
    if (i > 0) {
      const step = at - prevAt;
      if (step > maxGapMs) {
        if (open) close(evLastAt);
        windowStart = i;
        windowSum = 0;
        windowCount = 0;
        segmentStart = i;
      } else {
        monitoredMs += step;
      }
    }
    prevAt = at;

    // Slide the baseline window to (at − window, at).
    while (windowStart < i && readings[windowStart]!.at < at - windowMs) {
      if (inEvent[windowStart] === 0 && windowStart >= segmentStart) {
        windowSum -= readings[windowStart]!.spo2;
        windowCount--;
      }
      windowStart++;
    }

    if (open) {
      if (spo2 > evBaseline - cfg.dropPct) {
        close(at);
      } else {
        inEvent[i] = 1;
        evLastAt = at;
        if (spo2 < evNadir) evNadir = spo2;
      }
    } else if (windowCount > 0 && i - segmentStart > 0 && readings[segmentStart]!.at <= at - windowMs) {
      const baseline = windowSum / windowCount;
      if (spo2 <= baseline - cfg.dropPct) {
        open = true;
        evStart = at;
        evNadir = spo2;
        evBaseline = baseline;
        evLastAt = at;
        inEvent[i] = 1;
      }
    }
    if (inEvent[i] === 0) {
      windowSum += spo2;
      windowCount++;
    }
  }
  if (open) close(evLastAt);

  const hours = monitoredMs / 3_600_000;
  return { events, perHour: hours > 0 ? events.length / hours : 0, monitoredMin: monitoredMs / 60_000 };
}
