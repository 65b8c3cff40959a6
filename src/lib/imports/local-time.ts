/**
 * Wall-clock times in a unit's IANA zone → UTC instants, saying plainly when a wall time does
 * not exist (the spring gap) or happens twice (the autumn repeat). Pure: Intl only, no clock.
 *
 * Decision (documented in DEVELOPERS.md): a time in the spring gap is refused with its line;
 * a time in the repeated autumn hour is resolved by the order of the file — the first pass is
 * summer time, and once the readings have gone past it, the second pass is standard time.
 */

export interface WallTime {
  y: number;
  mo: number;
  d: number;
  h: number;
  mi: number;
  s: number;
  ms: number;
}

export type ZoneResolution =
  | { kind: 'unique'; at: number }
  | { kind: 'ambiguous'; earlier: number; later: number }
  | { kind: 'gap' };

const FIFTEEN_MIN = 15 * 60_000;

/** Offsets (ms, local − UTC) of one zone, cached per quarter hour: every real transition falls on one. */
export function zoneOffsets(timeZone: string): (utcMs: number) => number {
  // Intl here reads zone offsets (a computation), it formats nothing for display.
  const fmt = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: 'numeric',
    day: 'numeric',
    hour: 'numeric',
    minute: 'numeric',
    second: 'numeric',
  });
  const cache = new Map<number, number>();
  return (utcMs: number) => {
    const bucket = Math.floor(utcMs / FIFTEEN_MIN);
    let offset = cache.get(bucket);
    if (offset === undefined) {
      const at = bucket * FIFTEEN_MIN;
      const p: Record<string, number> = {};
      for (const part of fmt.formatToParts(new Date(at)))
        if (part.type !== 'literal') p[part.type] = Number(part.value);
      offset = Date.UTC(p.year!, p.month! - 1, p.day!, p.hour!, p.minute!, p.second!) - at;
      cache.set(bucket, offset);
    }
    return offset;
  };
}

export function isValidWallTime(w: WallTime): boolean {
  if (w.mo < 1 || w.mo > 12 || w.d < 1 || w.h > 23 || w.mi > 59 || w.s > 59) return false;
  const daysInMonth = new Date(Date.UTC(w.y, w.mo, 0)).getUTCDate();
  return w.d <= daysInMonth;
}

/** A resolver for one zone: wall time → unique instant, both instants of a repeated time, or the gap. */
export function zoneResolver(timeZone: string): (w: WallTime) => ZoneResolution {
  const offsetAt = zoneOffsets(timeZone);
  return (w) => {
    const wall = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s, w.ms);
    // At most one transition lies within ±14 h of any wall time in every zone in use.
    const before = offsetAt(wall - 14 * 3_600_000);
    const after = offsetAt(wall + 14 * 3_600_000);
    const found: number[] = [];
    for (const o of before === after ? [before] : [before, after]) {
      const u = wall - o;
      if (offsetAt(u) === o && !found.includes(u)) found.push(u);
    }
    if (found.length === 0) return { kind: 'gap' };
    if (found.length === 1) return { kind: 'unique', at: found[0]! };
    found.sort((a, b) => a - b);
    return { kind: 'ambiguous', earlier: found[0]!, later: found[1]! };
  };
}

/**
 * Picks the instant of a repeated wall time from the reading before it in the file: once the
 * file has passed the earlier instant, the later one is meant. Files in time order resolve exactly.
 */
export function resolveRepeated(r: { earlier: number; later: number }, previousAt: number | null): number {
  return previousAt !== null && r.earlier < previousAt && r.later >= previousAt ? r.later : r.earlier;
}

export function wallTimeText(w: WallTime): string {
  const p = (n: number, l = 2) => String(n).padStart(l, '0');
  return `${p(w.y, 4)}-${p(w.mo)}-${p(w.d)} ${p(w.h)}:${p(w.mi)}:${p(w.s)}`;
}
