/**
 * Shift windows and local days in a unit's time zone. Shift start and end are wall-clock times
 * ("07:30", "19:30", unit settings); the day shift runs start → end, the night shift end → start.
 * Pure: the clock is passed in.
 */
import { formatInTimeZone, fromZonedTime } from 'date-fns-tz';

export const DEFAULT_SHIFT = { start: '07:30', end: '19:30' } as const;
export const CLOCK_PATTERN = /^([01]\d|2[0-3]):[0-5]\d$/;

export interface ShiftWindow {
  /** Epoch ms the shift started. */
  from: number;
  /** Epoch ms the shift ends (may be after `now`: the sheet covers the shift just ending). */
  to: number;
  kind: 'day' | 'night';
}

/** Local calendar date (YYYY-MM-DD) of an instant in a zone. */
export function localDate(at: number, timeZone: string): string {
  return formatInTimeZone(new Date(at), timeZone, 'yyyy-MM-dd');
}

/** The instant a wall-clock time on a local date happens in a zone. */
export function wallTime(date: string, clock: string, timeZone: string): number {
  return fromZonedTime(`${date}T${clock}:00`, timeZone).getTime();
}

/** The local date `days` after `date` (negative for before); calendar arithmetic, no zone involved. */
export function addDays(date: string, days: number): string {
  const d = new Date(`${date}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/** The shift that contains `now`: the one a handover at `now` hands over. */
export function currentShift(
  now: number,
  timeZone: string,
  start: string = DEFAULT_SHIFT.start,
  end: string = DEFAULT_SHIFT.end,
): ShiftWindow {
  if (!CLOCK_PATTERN.test(start) || !CLOCK_PATTERN.test(end) || start === end)
    throw new RangeError(`bad shift times ${start}–${end}`);
  const today = localDate(now, timeZone);
  const bounds: { at: number; kind: 'day' | 'night' }[] = [];
  for (let d = -2; d <= 2; d++) {
    const date = addDays(today, d);
    bounds.push(
      { at: wallTime(date, start, timeZone), kind: 'day' },
      { at: wallTime(date, end, timeZone), kind: 'night' },
    );
  }
  bounds.sort((a, b) => a.at - b.at);
  let i = bounds.length - 1;
  while (i > 0 && bounds[i]!.at > now) i--;
  const from = bounds[i]!;
  return { from: from.at, to: bounds[i + 1]!.at, kind: from.kind };
}

export interface LocalDay {
  date: string;
  from: number;
  to: number;
}

/** The `count` whole local days before the local day of `now` (today excluded), oldest first. */
export function lastWholeDays(now: number, timeZone: string, count: number): LocalDay[] {
  const today = localDate(now, timeZone);
  const days: LocalDay[] = [];
  for (let d = count; d >= 1; d--) {
    const date = addDays(today, -d);
    days.push({ date, from: wallTime(date, '00:00', timeZone), to: wallTime(addDays(date, 1), '00:00', timeZone) });
  }
  return days;
}
