import { describe, expect, it } from 'vitest';
import {
  formatAge,
  formatClock,
  formatClockSeconds,
  formatCount,
  formatDate,
  formatDateTime,
  formatDayTime,
  formatDayTimeSeconds,
  formatMinutes,
  formatWhen,
} from './format.ts';

// 2 Dec 2026 06:14:05 in London is 06:14:05 UTC (GMT in winter); in New York it is 01:14:05.
const at = '2026-12-02T06:14:05Z';

describe('time formatting (unit zone, 24-hour, day first, month as a word)', () => {
  it('writes the unit’s wall clock, not the machine’s', () => {
    expect(formatClock(at, 'Europe/London')).toBe('06:14');
    expect(formatClock(at, 'America/New_York')).toBe('01:14');
    expect(formatClockSeconds(at, 'Europe/London')).toBe('06:14:05');
    expect(formatDayTime(at, 'Europe/London')).toBe('2 Dec 06:14');
    expect(formatDayTimeSeconds(at, 'Australia/Sydney')).toBe('2 Dec 17:14:05');
    expect(formatDate(at, 'Europe/London')).toBe('2 Dec 2026');
    expect(formatDateTime('2026-09-12T19:05:00Z', 'Europe/London')).toBe('12 Sep 2026 20:05');
  });

  it('uses the 24-hour clock past noon and across midnight', () => {
    expect(formatClock('2026-12-02T23:59:00Z', 'Europe/London')).toBe('23:59');
    expect(formatDayTime('2026-12-02T23:30:00Z', 'Europe/Berlin')).toBe('3 Dec 00:30');
  });

  it('drops the day when it is today in the unit', () => {
    expect(formatWhen('2026-12-02T06:14:00Z', 'Europe/London', '2026-12-02T20:00:00Z')).toBe('06:14');
    expect(formatWhen('2026-12-01T23:14:00Z', 'Europe/London', '2026-12-02T06:00:00Z')).toBe('1 Dec 23:14');
  });

  it('says how old a value is', () => {
    const now = Date.parse(at);
    expect(formatAge(now - 2_000, now)).toBe('just now');
    expect(formatAge(now - 40_000, now)).toBe('40 s ago');
    expect(formatAge(now - 12 * 60_000, now)).toBe('12 min ago');
    expect(formatAge(now - 80 * 60_000, now)).toBe('1 h 20 min ago');
    expect(formatAge(now + 30_000, now)).toBe('just now');
    expect(formatMinutes(120)).toBe('2 h');
    expect(formatMinutes(27 * 60)).toBe('1 d 3 h');
  });

  it('groups counts the same in every locale', () => {
    expect(formatCount(259200)).toBe('259,200');
    expect(formatCount(-1234567)).toBe('-1,234,567');
    expect(formatCount(12)).toBe('12');
  });

  it('refuses what is not a time', () => {
    expect(() => formatClock('yesterday', 'Europe/London')).toThrow(RangeError);
  });
});
