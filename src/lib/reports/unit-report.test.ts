import { describe, expect, it } from 'vitest';
import type { Reading } from '~/lib/oxygenation/index.ts';
import { lastWholeDays } from './shift.ts';
import { overdueStarts, unitReportFigures } from './unit-report.ts';

// A hand-computed day (the arithmetic is written out beside each expectation; no outside source).
const day = { date: '2026-11-30', from: Date.UTC(2026, 10, 30, 0, 0), to: Date.UTC(2026, 11, 1, 0, 0) };
const at = (h: number, m = 0) => day.from + (h * 60 + m) * 60_000;
const charted = (t: number, spo2: number, trace: Reading['trace'] = 'clean'): Reading => ({
  at: t,
  spo2,
  trace,
  source: 'charted',
});

describe('unitReportFigures (hand-computed case)', () => {
  const readings = [charted(at(0), 95), charted(at(1), 90), charted(at(2), 94, 'noisy'), charted(at(3), 95)];
  const result = unitReportFigures({
    days: [day],
    overdueMin: 75,
    patients: [
      {
        patientId: 1,
        stays: [{ from: day.from - 3_600_000, to: null }],
        readings,
        orders: [{ from: day.from - 3_600_000, low: 92, high: 96 }],
        chartedTimes: readings.map((r) => r.at),
      },
    ],
    escalations: [
      { kind: 'below_band', severity: 'standard', raisedAt: at(1, 10), claimedAt: at(1, 20), closedAt: at(1, 50) },
      { kind: 'below_band', severity: 'urgent', raisedAt: at(5), claimedAt: at(5, 30), closedAt: at(7) },
      { kind: 'probe_check', severity: null, raisedAt: at(2, 5), claimedAt: null, closedAt: null },
      { kind: 'wean_prompt', severity: null, raisedAt: day.from - 60_000, claimedAt: null, closedAt: null }, // the day before: not counted
    ],
  });
  const d = result.days[0]!;

  it('adds band time from the computation: 60 + 75 min in band, 60 below, 60 untrusted', () => {
    // 00:00 95 stands to 01:00 (in band 60); 01:00 90 to 02:00 (below 60); 02:00 noisy to 03:00 (untrusted 60);
    // 03:00 95 carries the charted limit of 75 min, to 04:15 (in band 75); the rest of the day has no reading.
    expect(d.inBandMin).toBe(135);
    expect(d.belowMin).toBe(60);
    expect(d.untrustedMin).toBe(60);
    expect(d.noReadingMin).toBe(1440 - 255);
    expect(d.timeInBandPct).toBeCloseTo((135 / 195) * 100, 10); // 69.23 %
    expect(d.burdenPctMin).toBe(120); // (92 − 90) × 60
  });

  it('per patient-day: one patient all day is one patient-day, 60 min below per patient-day', () => {
    expect(d.patientDays).toBe(1);
    expect(d.belowMinPerPatientDay).toBe(60);
  });

  it('counts escalations by kind and severity raised that day, and response times by quantile', () => {
    expect(d.escalations).toEqual({ belowStandard: 1, belowUrgent: 1, probeCheck: 1, weanPrompt: 0 });
    // raised → claimed: 10 and 30 min; median 20; p90 = 10 + 0.9 × (30 − 10) = 28.
    expect(d.toClaimMin).toEqual({ n: 2, median: 20, p90: 28 });
    // claimed → closed: 30 and 90 min; median 60; p90 = 30 + 0.9 × 60 = 84.
    expect(d.toCloseMin).toEqual({ n: 2, median: 60, p90: 84 });
  });

  it('counts overdue obs: once, 75 min after the last obs at 03:00', () => {
    expect(d.overdueCount).toBe(1);
    // Before midnight the stay began 23:00 with no obs until 00:00 (60 min): not overdue.
  });

  it('gives the share of untrusted readings: 1 of 4', () => {
    expect(d.trustedReadings).toBe(3);
    expect(d.untrustedReadings).toBe(1);
    expect(d.untrustedSharePct).toBe(25);
  });

  it('totals equal the single day', () => {
    expect(result.total.inBandMin).toBe(135);
    expect(result.total.toClaimMin.median).toBe(20);
    expect(result.patientDays).toHaveLength(1);
    expect(result.patientDays[0]!.belowMin).toBe(60);
  });

  it('counts a patient admitted half the day as half a patient-day', () => {
    const half = unitReportFigures({
      days: [day],
      overdueMin: 75,
      escalations: [],
      patients: [{ patientId: 2, stays: [{ from: at(12), to: null }], readings: [], orders: [], chartedTimes: [] }],
    });
    expect(half.days[0]!.patientDays).toBe(0.5);
    expect(half.days[0]!.timeInBandPct).toBeNull();
    // No obs from 12:00: due 13:15, overdue once.
    expect(half.days[0]!.overdueCount).toBe(1);
  });
});

describe('overdueStarts', () => {
  it('starts an episode at last obs + limit when the next came later, and one at the end when none came', () => {
    const stays = [{ from: 0, to: 600 * 60_000 }];
    const starts = overdueStarts([60 * 60_000, 120 * 60_000, 300 * 60_000], stays, 75, Infinity);
    // 0 → 60 fine; 60 → 120 fine; 120 → 300 late (due 195); 300 → stay end 600 late (due 375).
    expect(starts).toEqual([195 * 60_000, 375 * 60_000]);
  });
});

describe('lastWholeDays', () => {
  it('gives whole local days before today, across the autumn clock change (25 h)', () => {
    // 27 Oct 2026 10:00 London; 25 Oct 2026 is the day clocks go back (BST → GMT).
    const days = lastWholeDays(Date.UTC(2026, 9, 27, 10), 'Europe/London', 3);
    expect(days.map((d) => d.date)).toEqual(['2026-10-24', '2026-10-25', '2026-10-26']);
    expect((days[1]!.to - days[1]!.from) / 3_600_000).toBe(25);
    expect(new Date(days[0]!.from).toISOString()).toBe('2026-10-23T23:00:00.000Z');
  });
});
