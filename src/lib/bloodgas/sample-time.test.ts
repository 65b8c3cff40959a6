import { describe, expect, it } from 'vitest';
import { sampleInstant, unitDayOptions } from './sample-time.ts';

describe('sample time in the unit zone (not the browser zone)', () => {
  const now = new Date('2026-07-02T00:30:00Z'); // 01:30 on 2 Jul in London (BST)
  it('offers today and yesterday as unit-zone days', () => {
    expect(unitDayOptions(now, 'Europe/London')).toEqual([
      { value: '2026-07-02', label: '2 Jul (today)' },
      { value: '2026-07-01', label: '1 Jul (yesterday)' },
    ]);
    expect(unitDayOptions(now, 'UTC')[0]!.value).toBe('2026-07-02');
  });
  it('reads the clock in the unit zone', () => {
    expect(sampleInstant('2026-07-02', '01:10', 'Europe/London')).toEqual({ at: new Date('2026-07-02T00:10:00Z') });
    expect(sampleInstant('2026-12-02', '0614', 'Europe/London')).toEqual({ at: new Date('2026-12-02T06:14:00Z') });
  });
  it('says what is wrong', () => {
    expect(sampleInstant('2026-07-02', '25:00', 'Europe/London')).toEqual({ error: expect.stringMatching(/24-hour/) });
    expect(sampleInstant('2026-03-29', '01:30', 'Europe/London')).toEqual({
      error: expect.stringMatching(/did not exist/),
    });
  });
});
