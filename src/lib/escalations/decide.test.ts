import { describe, expect, it } from 'vitest';
import type { BandStateResult, Concerns } from '~/lib/oxygenation/index.ts';
import { decideEscalations, renotifyDue, retryDelayMs, type OpenEscalation } from './decide.ts';

const none: Concerns = { belowBand: null, cannotVerify: null, aboveOnOxygen: null };
const inBand = (sinceMin: number): BandStateResult => ({
  state: 'in',
  since: 0,
  sinceMin,
  latest: null,
  onOxygen: false,
});
const reading = { at: 2_000, spo2: 88, trace: 'clean' as const, source: 'charted' as const };
const below = (severity: 'standard' | 'urgent', runStart = 1_000): Concerns['belowBand'] => ({
  severity,
  rule: 'charted_consecutive',
  runStart,
  runEnd: 2_000,
  firstReading: reading,
  lastReading: reading,
  nadir: 88,
  sinceMin: 20,
  metAt: 2_000,
  chartedCount: 2,
  urgentReasons: [],
});
const open = (o: Partial<OpenEscalation>): OpenEscalation => ({
  id: 1,
  kind: 'below_band',
  severity: 'standard',
  runStart: 1_000,
  backInBandNoted: false,
  ...o,
});

describe('escalation decisions', () => {
  it('raises a below-band escalation once, then nothing while it is open', () => {
    const concerns = { ...none, belowBand: below('standard') };
    expect(decideEscalations({ concerns, state: inBand(0), open: [], lastClosedRunStart: {} })).toEqual([
      { type: 'raise', kind: 'below_band', severity: 'standard', runStart: 1_000, runEnd: 2_000 },
    ]);
    expect(decideEscalations({ concerns, state: inBand(0), open: [open({})], lastClosedRunStart: {} })).toEqual([]);
  });

  it('upgrades an open standard escalation when the run turns urgent', () => {
    const concerns = { ...none, belowBand: below('urgent') };
    expect(decideEscalations({ concerns, state: inBand(0), open: [open({})], lastClosedRunStart: {} })).toEqual([
      { type: 'upgrade', id: 1, severity: 'urgent' },
    ]);
  });

  it('does not raise again for the run it already closed, but does for a new run', () => {
    expect(
      decideEscalations({
        concerns: { ...none, belowBand: below('standard', 1_000) },
        state: inBand(0),
        open: [],
        lastClosedRunStart: { below_band: 1_000 },
      }),
    ).toEqual([]);
    expect(
      decideEscalations({
        concerns: { ...none, belowBand: below('standard', 5_000) },
        state: inBand(0),
        open: [],
        lastClosedRunStart: { below_band: 1_000 },
      }),
    ).toHaveLength(1);
  });

  it('notes back in band after 30 min, once', () => {
    expect(decideEscalations({ concerns: none, state: inBand(29), open: [open({})], lastClosedRunStart: {} })).toEqual(
      [],
    );
    expect(decideEscalations({ concerns: none, state: inBand(30), open: [open({})], lastClosedRunStart: {} })).toEqual([
      { type: 'back_in_band', id: 1 },
    ]);
    expect(
      decideEscalations({
        concerns: none,
        state: inBand(45),
        open: [open({ backInBandNoted: true })],
        lastClosedRunStart: {},
      }),
    ).toEqual([]);
  });

  it('raises a probe check for cannot-verify and closes it when a trusted reading returns', () => {
    const cv: Concerns = {
      ...none,
      cannotVerify: {
        since: 100,
        sinceMin: 16,
        untrustedReadings: 3,
        lastTrustedAt: null,
        lastReading: { ...reading, trace: 'noisy' },
      },
    };
    expect(decideEscalations({ concerns: cv, state: inBand(0), open: [], lastClosedRunStart: {} })).toEqual([
      { type: 'raise', kind: 'probe_check', severity: null, runStart: 100, runEnd: 2_000 },
    ]);
    const closing = decideEscalations({
      concerns: none,
      state: inBand(0),
      open: [open({ id: 7, kind: 'probe_check', severity: null })],
      lastClosedRunStart: {},
    });
    expect(closing).toEqual([
      { type: 'auto_close', id: 7, kind: 'probe_check', reason: expect.stringContaining('trusted reading') },
    ]);
  });

  it('re-notifies only once the unit time has passed since the last mail', () => {
    expect(renotifyDue(null, 0, 15, 14 * 60_000)).toBe(false);
    expect(renotifyDue(null, 0, 15, 15 * 60_000)).toBe(true);
    expect(renotifyDue(20 * 60_000, 0, 15, 30 * 60_000)).toBe(false);
  });

  it('backs off delivery retries and caps them', () => {
    expect([1, 2, 3].map((n) => retryDelayMs(n))).toEqual([10_000, 20_000, 40_000]);
    expect(retryDelayMs(30)).toBe(600_000);
  });
});
