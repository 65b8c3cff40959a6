import { describe, expect, it } from 'vitest';
import { resolveRepeated, zoneResolver } from './local-time.ts';

// Europe/London in 2026: summer time from 29 March 01:00 UTC to 25 October 01:00 UTC (UK rule:
// last Sunday of March and of October, at 01:00 GMT).
const london = zoneResolver('Europe/London');
const wall = (y: number, mo: number, d: number, h: number, mi: number, s = 0) => ({ y, mo, d, h, mi, s, ms: 0 });

describe('wall-clock times in a unit zone', () => {
  it('maps an ordinary winter and summer time to UTC', () => {
    expect(london(wall(2026, 1, 15, 9, 30))).toEqual({ kind: 'unique', at: Date.UTC(2026, 0, 15, 9, 30) });
    expect(london(wall(2026, 7, 15, 9, 30))).toEqual({ kind: 'unique', at: Date.UTC(2026, 6, 15, 8, 30) });
  });

  it('says the spring hour does not exist', () => {
    expect(london(wall(2026, 3, 29, 1, 0))).toEqual({ kind: 'gap' });
    expect(london(wall(2026, 3, 29, 1, 59, 59))).toEqual({ kind: 'gap' });
    expect(london(wall(2026, 3, 29, 0, 59, 59))).toEqual({ kind: 'unique', at: Date.UTC(2026, 2, 29, 0, 59, 59) });
    expect(london(wall(2026, 3, 29, 2, 0))).toEqual({ kind: 'unique', at: Date.UTC(2026, 2, 29, 1, 0) });
  });

  it('gives both instants of the repeated autumn hour, and the order of readings picks one', () => {
    const r = london(wall(2026, 10, 25, 1, 30));
    expect(r).toEqual({
      kind: 'ambiguous',
      earlier: Date.UTC(2026, 9, 25, 0, 30),
      later: Date.UTC(2026, 9, 25, 1, 30),
    });
    if (r.kind !== 'ambiguous') throw new Error('expected ambiguous');
    // First pass: the reading before was 01:29 BST (00:29 UTC).
    expect(resolveRepeated(r, Date.UTC(2026, 9, 25, 0, 29))).toBe(r.earlier);
    // Second pass: the reading before was 01:29 GMT (01:29 UTC), already past the earlier instant.
    expect(resolveRepeated(r, Date.UTC(2026, 9, 25, 1, 29))).toBe(r.later);
    expect(resolveRepeated(r, null)).toBe(r.earlier);
  });

  it('works in a zone without daylight saving and in one south of the equator', () => {
    expect(zoneResolver('UTC')(wall(2026, 3, 29, 1, 30))).toEqual({ kind: 'unique', at: Date.UTC(2026, 2, 29, 1, 30) });
    // Australia/Sydney: clocks go forward on 4 October 2026 at 02:00 local (AEST → AEDT).
    expect(zoneResolver('Australia/Sydney')(wall(2026, 10, 4, 2, 30))).toEqual({ kind: 'gap' });
  });
});
