import { describe, expect, it } from 'vitest';
import { currentShift } from './shift.ts';

const iso = (t: number) => new Date(t).toISOString();

describe('currentShift (unit zone, 07:30 / 19:30 defaults)', () => {
  it('is the day shift at 19:10 London time in winter', () => {
    const s = currentShift(Date.UTC(2026, 11, 2, 19, 10), 'Europe/London');
    expect(s.kind).toBe('day');
    expect(iso(s.from)).toBe('2026-12-02T07:30:00.000Z');
    expect(iso(s.to)).toBe('2026-12-02T19:30:00.000Z');
  });
  it('is the night shift after midnight, begun the evening before', () => {
    const s = currentShift(Date.UTC(2026, 11, 3, 2, 0), 'Europe/London');
    expect(s.kind).toBe('night');
    expect(iso(s.from)).toBe('2026-12-02T19:30:00.000Z');
    expect(iso(s.to)).toBe('2026-12-03T07:30:00.000Z');
  });
  it('follows summer time and other settings', () => {
    const s = currentShift(Date.UTC(2026, 6, 1, 12, 0), 'Europe/London', '08:00', '20:00');
    expect(iso(s.from)).toBe('2026-07-01T07:00:00.000Z'); // 08:00 BST
  });
  it('refuses malformed clocks', () => {
    expect(() => currentShift(0, 'Europe/London', '7:30', '19:30')).toThrow(RangeError);
  });
});
