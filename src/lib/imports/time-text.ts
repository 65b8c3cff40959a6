/**
 * The time formats a trend file may use. ISO 8601 with an offset (Z or ±hh:mm) is an instant;
 * without one it is the unit's wall-clock time. "YYYY-MM-DD HH:mm[:ss[.fff]]" and the
 * day-first "DD/MM/YYYY HH:mm[:ss]" (as monitors set up in the UK export) are wall-clock times.
 */
import type { WallTime } from './local-time.ts';

const ISO = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?$/i;
const DMY = /^(\d{1,2})\/(\d{1,2})\/(\d{4})[ T](\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?$/;

export type ParsedTime = { wall: WallTime; offsetMs: number | null } | null;

function ms(frac: string | undefined): number {
  return frac ? Math.floor(Number(`0.${frac}`) * 1000) : 0;
}

/** Splits a time text into wall-clock fields and, when it carries one, its UTC offset. */
export function parseTimeText(text: string): ParsedTime {
  let m = ISO.exec(text);
  if (m) {
    const wall = { y: +m[1]!, mo: +m[2]!, d: +m[3]!, h: +m[4]!, mi: +m[5]!, s: m[6] ? +m[6] : 0, ms: ms(m[7]) };
    let offsetMs: number | null = null;
    if (m[8]) {
      if (m[8].toUpperCase() === 'Z') offsetMs = 0;
      else {
        const sign = m[8][0] === '-' ? -1 : 1;
        const digits = m[8].slice(1).replace(':', '');
        offsetMs = sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2) || 0)) * 60_000;
      }
    }
    return { wall, offsetMs };
  }
  m = DMY.exec(text);
  if (m)
    return {
      wall: { y: +m[3]!, mo: +m[2]!, d: +m[1]!, h: +m[4]!, mi: +m[5]!, s: m[6] ? +m[6] : 0, ms: ms(m[7]) },
      offsetMs: null,
    };
  return null;
}
