/**
 * The sample time as a nurse types it: a day (today or yesterday in the unit's zone) and a 24-hour
 * clock time read off the analyser printout, turned into an instant in the unit's zone — never the
 * browser's zone. Pure: `now` is passed in.
 */
import { formatInTimeZone } from 'date-fns-tz';
import { zoneResolver } from '~/lib/imports/local-time.ts';

export function unitDayOptions(now: Date, timeZone: string, days = 2): { value: string; label: string }[] {
  const out: { value: string; label: string }[] = [];
  for (let i = 0; i < days; i++) {
    const at = new Date(now.getTime() - i * 86_400_000);
    out.push({
      value: formatInTimeZone(at, timeZone, 'yyyy-MM-dd'),
      label: `${formatInTimeZone(at, timeZone, 'd MMM')}${i === 0 ? ' (today)' : i === 1 ? ' (yesterday)' : ''}`,
    });
  }
  return out;
}

/** "HH:mm" (or "HHmm") on a unit-zone day → the instant; an error in words otherwise. */
export function sampleInstant(day: string, clock: string, timeZone: string): { at: Date } | { error: string } {
  const d = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
  const c = /^(\d{1,2}):?(\d{2})$/.exec(clock.trim());
  if (!d) return { error: 'Choose the day of the sample' };
  if (!c || Number(c[1]) > 23 || Number(c[2]) > 59) return { error: 'Sample time: 24-hour clock, e.g. 06:14' };
  const r = zoneResolver(timeZone)({ y: +d[1]!, mo: +d[2]!, d: +d[3]!, h: +c[1]!, mi: +c[2]!, s: 0, ms: 0 });
  if (r.kind === 'gap') return { error: 'That clock time did not exist (the clocks went forward)' };
  return { at: new Date(r.kind === 'unique' ? r.at : r.earlier) };
}

/** The clock time of an instant in the unit's zone, for prefilling ("06:14"). */
export const clockIn = (at: Date, timeZone: string) => formatInTimeZone(at, timeZone, 'HH:mm');
