import { describe, expect, it } from 'vitest';
import type { Reading } from '~/lib/oxygenation/types.ts';
import { DEFAULT_UNIT_SETTINGS } from '~/lib/units/settings.ts';
import { judgePatient, lastClosedRunStarts, readingsUnderBand, toOpenEscalation } from './judge.ts';

const MIN = 60_000;
const now = 10 * 60 * MIN;
const charted = (minAgo: number, spo2: number): Reading => ({ at: now - minAgo * MIN, spo2, trace: 'clean', source: 'charted' });
const band = (orderedMinAgo: number) => ({ low: 92, high: 96, orderedAt: now - orderedMinAgo * MIN });
const base = { settings: DEFAULT_UNIT_SETTINGS, open: [], lastClosedRunStart: {}, now };

describe('judgePatient', () => {
  // Two charted obs below band in a row make a sustained-below concern (default consecutiveCharted = 2, a setting).
  const twoBelow = [charted(120, 95), charted(60, 89), charted(1, 90)];

  it('raises below band from two charted obs below the band in force', () => {
    const j = judgePatient({ ...base, readings: twoBelow, band: band(180) });
    expect(j.actions).toEqual([{ type: 'raise', kind: 'below_band', severity: 'standard', runStart: now - 60 * MIN, runEnd: now - MIN }]);
    expect(j.state.state).toBe('below');
  });

  it('does not re-judge readings taken before the band now in force', () => {
    const j = judgePatient({ ...base, readings: twoBelow, band: band(30) });
    expect(j.readings).toEqual([charted(1, 90)]);
    expect(j.actions).toEqual([]);
  });

  it('does not raise the run the patient already had closed', () => {
    const j = judgePatient({ ...base, readings: twoBelow, band: band(180), lastClosedRunStart: { below_band: now - 60 * MIN } });
    expect(j.actions).toEqual([]);
  });
});

describe('row helpers', () => {
  it('keeps every reading when no band is ordered', () => {
    expect(readingsUnderBand([{ at: 1 }, { at: 2 }], null)).toHaveLength(2);
    expect(readingsUnderBand([{ at: 1 }, { at: 2 }], { orderedAt: 2 })).toEqual([{ at: 2 }]);
  });
  it('reads open and closed escalation rows as the decision needs them', () => {
    expect(toOpenEscalation({ id: 7, kind: 'below_band', severity: 'urgent', run_start: new Date(5_000), back_in_band_at: null }))
      .toEqual({ id: 7, kind: 'below_band', severity: 'urgent', runStart: 5_000, backInBandNoted: false });
    expect(lastClosedRunStarts([{ kind: 'probe_check', run_start: new Date(9_000) }])).toEqual({ probe_check: 9_000 });
  });
});
