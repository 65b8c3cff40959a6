import { describe, expect, it } from 'vitest';
import type { Reading } from '~/lib/oxygenation/types.ts';
import { DEFAULT_UNIT_SETTINGS } from '~/lib/units/settings.ts';
import { buildTile, latestWords, monitorWords, sortTiles, stateWords, type BedInput } from './tiles.ts';

const now = Date.UTC(2026, 11, 2, 12, 0);
const min = 60_000;
const band = { low: 92, high: 96, news2Scale: 1 as const, orderedAt: now - 24 * 60 * min };

function device(minsAgo: number, spo2: number, extra: Partial<Reading> = {}): Reading {
  return { at: now - minsAgo * min, spo2, trace: 'clean', source: 'device', heartRate: 90, ...extra };
}
function charted(minsAgo: number, spo2: number, extra: Partial<Reading> = {}): Reading {
  return {
    at: now - minsAgo * min,
    spo2,
    trace: 'clean',
    source: 'charted',
    heartRate: 90,
    fio2: 0.28,
    device: 'nasal_cannula',
    ...extra,
  };
}
function bed(label: string, unsorted: Reading[], over: Partial<BedInput> = {}): BedInput {
  const readings = [...unsorted].sort((a, b) => a.at - b.at);
  const lastCharted = [...readings].reverse().find((r) => r.source === 'charted');
  return {
    bedId: label.length,
    bedLabel: label,
    patient: { id: 1, label: 'AB ·123', co2RetentionRisk: false },
    band,
    readings,
    lastCharted: lastCharted
      ? {
          at: lastCharted.at,
          spo2: lastCharted.spo2,
          heartRate: 90,
          respRate: 18,
          fio2: 0.28,
          fio2Estimated: true,
          device: 'nasal_cannula',
          systolic: 120,
          temperature: 37,
          consciousness: 'alert',
        }
      : null,
    escalation: null,
    nurse: null,
    ...over,
  };
}
const everyMinute = (from: number, to: number, spo2: (m: number) => number, extra: Partial<Reading> = {}) =>
  Array.from({ length: from - to + 1 }, (_, i) => device(from - i, spo2(from - i), extra));

describe('board tiles', () => {
  const settings = DEFAULT_UNIT_SETTINGS;

  it('says below band with its duration when trusted device readings stay under the lower limit', () => {
    const t = buildTile(
      bed('4-01', [charted(30, 94), ...everyMinute(40, 19, () => 94), ...everyMinute(18, 0, () => 88)]),
      now,
      settings,
    );
    expect(t.state).toMatchObject({ name: 'below', sinceMin: 18, was: null });
    expect(t.concern.key).toBe('below_band');
    expect(t.concern.reason).toBe('Below band 18 min');
    expect(t.concerns.belowBand?.severity).toBe('standard');
  });

  it('marks a run urgent at 5 points under the lower limit (unit setting, default 5)', () => {
    const t = buildTile(bed('4-01', [charted(30, 94), ...everyMinute(10, 0, () => 86)]), now, settings);
    expect(t.concerns.belowBand?.severity).toBe('urgent');
    expect(t.concern.reason).toContain('urgent');
  });

  it('never lets a poor trace make a below-band concern: it makes a cannot-verify concern instead', () => {
    const t = buildTile(
      bed('4-03', [charted(30, 94), ...everyMinute(20, 0, () => 80, { trace: 'noisy' })]),
      now,
      settings,
    );
    expect(t.concerns.belowBand).toBeNull();
    expect(t.concern.key).toBe('cannot_verify');
    expect(t.state.name).toBe('untrusted');
    expect(t.latest?.trusted).toBe(false);
  });

  it('flags obs overdue past the unit setting, and an empty bed quietly', () => {
    const overdue = buildTile(bed('4-05', [charted(80, 94), ...everyMinute(10, 0, () => 94)]), now, settings);
    expect(overdue.overdue).toBe(true);
    expect(overdue.concern.key).toBe('overdue');
    const onTime = buildTile(bed('4-05', [charted(70, 94), ...everyMinute(10, 0, () => 94)]), now, settings);
    expect(onTime.overdue).toBe(false);
    expect(onTime.concern.key).toBe('in_band');
    const empty = buildTile({ ...bed('4-07', []), patient: null }, now, settings);
    expect(empty.concern.key).toBe('empty');
  });

  it('prompts weaning when above band on oxygen for 30 min', () => {
    const t = buildTile(
      bed('4-02', [charted(20, 98, { fio2: 0.35 }), ...everyMinute(35, 0, () => 98, { fio2: 0.35 })]),
      now,
      settings,
    );
    expect(t.concern.key).toBe('above_on_oxygen');
    expect(t.state.name).toBe('above');
  });

  it('scores NEWS2 only when complete', () => {
    const t = buildTile(bed('4-06', [charted(20, 95), ...everyMinute(5, 0, () => 95)]), now, settings);
    expect(t.news2).not.toBeNull();
    const incomplete = bed('4-06', [charted(20, 95)]);
    incomplete.lastCharted!.systolic = null;
    expect(buildTile(incomplete, now, settings).news2).toBeNull();
  });

  it('sorts by concern in the order the brief gives, empty beds last', () => {
    const tiles = [
      buildTile({ ...bed('E', []), patient: null }, now, settings),
      buildTile(bed('IN', [charted(20, 94), ...everyMinute(5, 0, () => 94)]), now, settings),
      buildTile(
        bed('ABOVE', [charted(20, 98, { fio2: 0.35 }), ...everyMinute(35, 0, () => 98, { fio2: 0.35 })]),
        now,
        settings,
      ),
      buildTile(bed('OVERDUE', [charted(90, 94), ...everyMinute(5, 0, () => 94)]), now, settings),
      buildTile(bed('NOBAND', [charted(20, 94)], { band: null }), now, settings),
      buildTile(bed('CV', [charted(20, 94), ...everyMinute(20, 0, () => 80, { trace: 'noisy' })]), now, settings),
      buildTile(bed('BELOW', [charted(20, 94), ...everyMinute(10, 0, () => 89)]), now, settings),
      buildTile(
        bed('URGENT', [charted(20, 94), ...everyMinute(3, 0, () => 91)], {
          escalation: {
            id: 1,
            kind: 'below_band',
            severity: 'urgent',
            state: 'raised',
            raisedAt: now,
            claimedBy: null,
          },
        }),
        now,
        settings,
      ),
    ];
    expect(sortTiles(tiles).map((t) => t.bedLabel)).toEqual([
      'URGENT',
      'BELOW',
      'CV',
      'NOBAND',
      'OVERDUE',
      'ABOVE',
      'IN',
      'E',
    ]);
  });

  it('gives screen readers one sentence with the state in words', () => {
    const t = buildTile(bed('4-01', [charted(30, 94), ...everyMinute(18, 0, () => 88)]), now, settings);
    expect(t.sentence).toContain('Bed 4-01, patient AB ·123.');
    expect(t.sentence).toContain('Below band 18 min.');
  });
});

describe('every value has its age (issue 10 points 1 and 4)', () => {
  const settings = DEFAULT_UNIT_SETTINGS; // monitor silent after 3 min (a unit setting)
  const London = 'Europe/London'; // = UTC in December
  const seconds = (secAgo: number, spo2: number, extra: Partial<Reading> = {}): Reading => ({
    at: now - secAgo * 1000,
    spo2,
    trace: 'clean',
    source: 'device',
    heartRate: 90,
    ...extra,
  });

  it('the big number says where it comes from and how old it is', () => {
    const t = buildTile(bed('4-01', [charted(30, 94), seconds(40, 94)]), now, settings, London);
    expect(latestWords(t)).toBe('monitor · 40 s ago');
    const c = buildTile(bed('4-02', [charted(59, 94)]), now, settings, London);
    expect(latestWords(c)).toBe('charted 11:01');
    expect(c.monitor).toBeNull(); // no monitor readings: never "silent"
  });

  it('a silent monitor after below-band readings: "was below band until", duration frozen, concern kept, monitor silent since', () => {
    // Below band 11:30–11:45 every minute, then nothing for 15 minutes (the case seen on the demo).
    const readings = [charted(60, 94), ...everyMinute(30, 15, () => 89)];
    const t = buildTile(bed('4-03', readings), now, settings, London);
    expect(t.state).toMatchObject({ name: 'no_reading', was: 'below', wasMin: 15, until: now - 15 * min });
    expect(stateWords(t)).toBe('was below band 15 min until 11:45 · no reading since');
    expect(monitorWords(t)).toBe('monitor silent since 11:45');
    expect(t.concern.key).toBe('below_band');
    expect(t.concern.reason).toBe('Was below band 15 min, until 11:45 — no reading since: check the bedside');
    expect(latestWords(t)).toBe('monitor · 11:45');
    // Ten minutes later the words are the same: nothing grows while nothing arrives.
    const later = buildTile(bed('4-03', readings), now + 10 * min, settings, London);
    expect(stateWords(later)).toBe(stateWords(t));
    expect(later.concern.reason).toBe(t.concern.reason);
    expect(later.sentence).toContain('Monitor silent since 11:45.');
  });

  it('a monitor quiet for less than the unit setting is not silent', () => {
    const t = buildTile(bed('4-04', [charted(30, 94), seconds(170, 94)]), now, settings, London);
    expect(t.monitor).toMatchObject({ silent: false });
    expect(
      buildTile(bed('4-04', [charted(30, 94), seconds(170, 94)]), now, { ...settings, monitorSilentMin: 2 }, London)
        .monitor?.silent,
    ).toBe(true);
  });

  it('an untrusted reading says why: its trace, or its perfusion index under the unit threshold with the value', () => {
    const pi = buildTile(
      bed('4-05', [
        charted(30, 94),
        ...Array.from({ length: 20 }, (_, i) => seconds(i * 50, 85, { perfusionIndex: 0.2 })).reverse(),
      ]),
      now,
      settings,
      London,
    );
    expect(pi.latest).toMatchObject({
      trusted: false,
      trace: 'clean',
      untrustedReason: 'perfusion index 0.2 % under 0.4 %',
    });
    expect(stateWords(pi)).toMatch(/^untrusted reading/);
    expect(pi.sentence).toContain('not trusted: perfusion index 0.2 % under 0.4 %');
    expect(pi.sentence).not.toContain('poor trace');
    const noisy = buildTile(bed('4-06', [charted(30, 94), seconds(5, 80, { trace: 'noisy' })]), now, settings, London);
    expect(noisy.latest?.untrustedReason).toBe('noisy trace');
  });
});
