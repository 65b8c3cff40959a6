import { describe, expect, it } from 'vitest';
import type { Reading } from '~/lib/oxygenation/types.ts';
import { DEFAULT_UNIT_SETTINGS } from '~/lib/units/settings.ts';
import { judgePatient, lastClosedRunStarts, readingsUnderBand, toOpenEscalation } from './judge.ts';

const MIN = 60_000;
const now = 10 * 60 * MIN;
const charted = (minAgo: number, spo2: number): Reading => ({
  at: now - minAgo * MIN,
  spo2,
  trace: 'clean',
  source: 'charted',
});
const band = (orderedMinAgo: number) => ({ low: 92, high: 96, orderedAt: now - orderedMinAgo * MIN });
const base = { settings: DEFAULT_UNIT_SETTINGS, open: [], lastClosedRunStart: {}, now };

describe('judgePatient', () => {
  // Two charted obs below band in a row make a sustained-below concern (default consecutiveCharted = 2, a setting).
  const twoBelow = [charted(120, 95), charted(60, 89), charted(1, 90)];

  it('raises below band from two charted obs below the band in force', () => {
    const j = judgePatient({ ...base, readings: twoBelow, band: band(180) });
    expect(j.actions).toEqual([
      { type: 'raise', kind: 'below_band', severity: 'standard', runStart: now - 60 * MIN, runEnd: now - MIN },
    ]);
    expect(j.state.state).toBe('below');
  });

  it('does not re-judge readings taken before the band now in force', () => {
    const j = judgePatient({ ...base, readings: twoBelow, band: band(30) });
    expect(j.readings).toEqual([charted(1, 90)]);
    expect(j.actions).toEqual([]);
  });

  it('does not raise the run the patient already had closed', () => {
    const j = judgePatient({
      ...base,
      readings: twoBelow,
      band: band(180),
      lastClosedRunStart: { below_band: now - 60 * MIN },
    });
    expect(j.actions).toEqual([]);
  });
});

describe('monitor silent right after trusted below-band readings (issue 10 point 2; unit setting default 3 min)', () => {
  const device = (secAgo: number, spo2: number, extra: Partial<Reading> = {}): Reading => ({
    at: now - secAgo * 1000,
    spo2,
    trace: 'clean',
    source: 'device',
    ...extra,
  });
  const belowThenSilent = (silentSec: number) =>
    Array.from({ length: 30 }, (_, i) => device(silentSec + (29 - i) * 2, 88));

  it('raises a bedside probe check once the monitor has been silent for the setting', () => {
    const j = judgePatient({ ...base, readings: belowThenSilent(181), band: band(600) });
    expect(j.silentAfterBelow).toMatchObject({ since: now - 181_000 });
    expect(j.actions).toEqual([
      { type: 'raise', kind: 'probe_check', severity: null, runStart: now - 181_000, runEnd: now - 181_000 },
    ]);
    expect(j.state.state).toBe('no_reading'); // the tile says so; the concern does not vanish silently
  });

  it("not before the setting, not after in-band or untrusted last readings, and the setting is the unit's", () => {
    expect(judgePatient({ ...base, readings: belowThenSilent(170), band: band(600) }).actions).toEqual([]);
    expect(
      judgePatient({ ...base, readings: [...belowThenSilent(300), device(200, 95)], band: band(600) }).silentAfterBelow,
    ).toBeNull();
    expect(
      judgePatient({
        ...base,
        readings: [...belowThenSilent(300), device(200, 80, { trace: 'noisy' })],
        band: band(600),
      }).silentAfterBelow,
    ).toBeNull();
    expect(
      judgePatient({
        ...base,
        settings: { ...DEFAULT_UNIT_SETTINGS, silentBelowProbeMin: 10 },
        readings: belowThenSilent(400),
        band: band(600),
      }).actions,
    ).toEqual([]);
  });

  it('closes the probe check when readings come in again', () => {
    const open = [
      { id: 3, kind: 'probe_check' as const, severity: null, runStart: now - 400_000, backInBandNoted: false },
    ];
    const j = judgePatient({ ...base, open, readings: [...belowThenSilent(400), device(5, 95)], band: band(600) });
    expect(j.actions).toEqual([
      {
        type: 'auto_close',
        id: 3,
        kind: 'probe_check',
        reason: 'A trusted reading came in: the trace can be verified again',
      },
    ]);
  });
});

describe('row helpers', () => {
  it('keeps every reading when no band is ordered', () => {
    expect(readingsUnderBand([{ at: 1 }, { at: 2 }], null)).toHaveLength(2);
    expect(readingsUnderBand([{ at: 1 }, { at: 2 }], { orderedAt: 2 })).toEqual([{ at: 2 }]);
  });
  it('reads open and closed escalation rows as the decision needs them', () => {
    expect(
      toOpenEscalation({
        id: 7,
        kind: 'below_band',
        severity: 'urgent',
        run_start: new Date(5_000),
        back_in_band_at: null,
      }),
    ).toEqual({ id: 7, kind: 'below_band', severity: 'urgent', runStart: 5_000, backInBandNoted: false });
    expect(lastClosedRunStarts([{ kind: 'probe_check', run_start: new Date(9_000) }])).toEqual({ probe_check: 9_000 });
  });
});
