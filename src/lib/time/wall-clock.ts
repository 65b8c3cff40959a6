/**
 * Typed wall-clock times in the unit's zone (the obs form's date + HH:MM entry), read the same way
 * whatever the browser's language or zone. Pure: no clock of its own.
 */
import { formatInTimeZone } from 'date-fns-tz';
import { zoneResolver } from '~/lib/imports/local-time.ts';

export interface WallEntry {
  date: string;
  time: string;
}

/** The unit-zone date ("2026-12-02") and 24-hour time ("06:14") of an instant, for the form's fields. */
export function toWallEntry(at: Date | number, timeZone: string): WallEntry {
  return { date: formatInTimeZone(at, timeZone, 'yyyy-MM-dd'), time: formatInTimeZone(at, timeZone, 'HH:mm') };
}

/**
 * Reads a typed date and 24-hour time in the unit's zone. The time may be "06:14", "6:14", "0614" or
 * "06.14"; the date "2026-12-02" or day first "02/12/2026". A time the clocks skipped is refused; a
 * time that happens twice (the clocks went back) is read as the first pass.
 */
export function parseWallEntry(entry: WallEntry, timeZone: string): { at: Date } | { error: string } {
  const t = /^\s*([01]?\d|2[0-3])[:.h]?([0-5]\d)\s*$/.exec(entry.time);
  if (!t) return { error: 'Time taken must be a 24-hour time such as 06:14' };
  const iso = /^\s*(\d{4})-(\d{1,2})-(\d{1,2})\s*$/.exec(entry.date);
  const dayFirst = /^\s*(\d{1,2})[/.](\d{1,2})[/.](\d{4})\s*$/.exec(entry.date);
  const [y, mo, d] = iso ? [iso[1], iso[2], iso[3]] : dayFirst ? [dayFirst[3], dayFirst[2], dayFirst[1]] : [];
  if (!y) return { error: 'Date taken must be written 2026-12-02 (or 02/12/2026, day first)' };
  const w = { y: Number(y), mo: Number(mo), d: Number(d), h: Number(t[1]), mi: Number(t[2]), s: 0, ms: 0 };
  const days = new Date(Date.UTC(w.y, w.mo, 0)).getUTCDate();
  if (w.mo < 1 || w.mo > 12 || w.d < 1 || w.d > days) return { error: 'Date taken is not a day of the calendar' };
  const r = zoneResolver(timeZone)(w);
  if (r.kind === 'gap')
    return {
      error: `${t[1]!.padStart(2, '0')}:${t[2]} did not happen that day in ${timeZone} (the clocks went forward)`,
    };
  return { at: new Date(r.kind === 'unique' ? r.at : r.earlier) };
}
