import { describe, expect, it } from 'vitest';
import { bandCompliance } from './compliance';
import { seededRandom } from '~/lib/random';
import {
  complianceFromMinutes,
  decodeTrustedMs,
  encodeTrustedMs,
  envelopeLines,
  floorMinute,
  minuteRollup,
  MINUTE_MS,
} from './rollup';
import type { BandOrder, Reading } from './types';

const T0 = Date.UTC(2025, 0, 1);
const HOUR = 3_600_000;

/** One reading a second hovering around a lower limit of 92 %, with noisy spells and gaps. */
function hovering(hours: number, seed = 7): Reading[] {
  const rand = seededRandom(seed);
  const out: Reading[] = [];
  for (let t = T0; t < T0 + hours * HOUR; t += 1000) {
    if (t % (17 * 60_000) < 4 * 60_000 && t > T0 + HOUR) continue; // a gap every 17 min
    const noisy = rand() < 0.05;
    out.push({
      at: t,
      spo2: 90 + Math.floor(rand() * 5),
      heartRate: 70 + Math.floor(rand() * 20),
      trace: noisy ? 'noisy' : 'clean',
      source: 'device',
    });
    if (t % (60 * 60_000) === 30 * 60_000) out.push({ at: t + 1, spo2: 93, trace: 'clean', source: 'charted' });
  }
  return out;
}

describe('minute rollup', () => {
  it('counts readings per minute with min, max and sum', () => {
    const r: Reading[] = [
      { at: T0 + 1000, spo2: 95, heartRate: 80, trace: 'clean', source: 'device' },
      { at: T0 + 2000, spo2: 91, heartRate: 90, trace: 'clean', source: 'device' },
      { at: T0 + 3000, spo2: 70, trace: 'noisy', source: 'device' },
      { at: T0 + 61_000, spo2: 96, trace: 'clean', source: 'charted' },
    ];
    const rows = minuteRollup(r, T0, T0 + 10 * MINUTE_MS);
    expect(rows[0]).toMatchObject({
      minute: T0,
      trustedN: 2,
      untrustedN: 1,
      spo2Min: 91,
      spo2Max: 95,
      spo2Sum: 186,
      uSpo2Min: 70,
      hrMin: 80,
      hrMax: 90,
    });
    // 95 stands 1 s, 91 stands 1 s, the noisy reading from 0:03 to the end of the minute (57 s).
    expect(rows[0]!.trustedMs).toEqual(
      new Map([
        [91, 1000],
        [95, 1000],
      ]),
    );
    expect(rows[0]!.untrustedMs).toBe(57_000);
    expect(rows[1]).toMatchObject({ chartedN: 1, trustedN: 1 });
    expect(decodeTrustedMs(encodeTrustedMs(rows[1]!.trustedMs))).toEqual(rows[1]!.trustedMs);
  });

  it("gives the raw computation's band compliance within 1 min over 24 h of one reading a second", () => {
    const readings = hovering(24);
    const orders: BandOrder[] = [
      { from: T0 + 30 * 60_000 + 17_000, low: 92, high: 96 }, // mid-minute on purpose
      { from: T0 + 10 * HOUR + 42_500, low: 88, high: 92 },
    ];
    const window = { from: T0, to: T0 + 24 * HOUR };
    const raw = bandCompliance(readings, orders, window);
    const rows = minuteRollup(readings, floorMinute(window.from), window.to);
    const fromRollup = complianceFromMinutes(rows, orders, window);
    for (const k of ['inBandMin', 'belowMin', 'aboveMin', 'untrustedMin', 'noReadingMin', 'noBandMin'] as const) {
      expect(Math.abs(fromRollup[k] - raw[k]), k).toBeLessThanOrEqual(1);
    }
    expect(fromRollup.windowMin).toBe(raw.windowMin);
    expect(fromRollup.trustedReadings).toBe(raw.trustedReadings);
    expect(fromRollup.untrustedReadings).toBe(raw.untrustedReadings);
    // Burden differs only by the two minutes split by an order change (at most 4 points × 1 min each).
    expect(Math.abs(fromRollup.burdenPctMin - raw.burdenPctMin)).toBeLessThanOrEqual(8);
  });

  it('recomputing a range with the reading before it gives the same rows as computing everything', () => {
    const readings = hovering(3, 11);
    const all = minuteRollup(readings, T0, T0 + 4 * HOUR);
    const from = T0 + 90 * MINUTE_MS;
    const to = T0 + 100 * MINUTE_MS;
    const before = readings.filter((r) => r.at < from).at(-1)!;
    const part = minuteRollup([before, ...readings.filter((r) => r.at >= from && r.at < to + 5 * MINUTE_MS)], from, to);
    expect(part).toEqual(all.filter((m) => m.minute >= from && m.minute < to));
  });

  it('keeps every line at most the budget and a below-band spell as a low envelope', () => {
    const readings = hovering(72, 3);
    const rows = minuteRollup(readings, T0, T0 + 72 * HOUR);
    const { spo2, heartRate } = envelopeLines(rows, T0, T0 + 72 * HOUR, 1500);
    expect(spo2.length).toBeLessThanOrEqual(1500);
    expect(heartRate.length).toBeLessThanOrEqual(1500);
    expect(Math.min(...spo2.map((p) => p.lo))).toBe(90);
    expect(spo2.every((p) => p.lo <= p.v && p.v <= p.hi)).toBe(true);
  });
});
