/**
 * The one way Ebbwatch shows time: in the unit's time zone, on a 24-hour clock, day first with
 * the month as a word ("2 Dec 06:14") — never the browser's locale or zone, so a nurse in any
 * country reads the same text. Pages, islands, e-mail and CSV all format through here.
 *
 * Month names are our own (Intl's en-GB writes "Sept" on some ICU versions and not on others, and
 * the server and the browser must print the same words); only the numbers come from Intl, with a
 * cached formatter per zone.
 */
export type Instant = Date | string | number;

function toDate(at: Instant): Date {
  const d = at instanceof Date ? at : new Date(at);
  if (Number.isNaN(d.getTime())) throw new RangeError(`not a time: ${String(at)}`);
  return d;
}

// Only the numbers come from Intl (one cached formatter per zone: a chart formats hundreds of
// ticks, and a fresh formatter per call cost ~0.25 ms each); the words are ours.
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const formatters = new Map<string, Intl.DateTimeFormat>();
interface Parts {
  y: number;
  mo: number;
  d: number;
  h: string;
  mi: string;
  s: string;
}
function partsOf(at: Instant, timeZone: string): Parts {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      numberingSystem: 'latn',
    });
    formatters.set(timeZone, f);
  }
  const p: Record<string, string> = {};
  for (const part of f.formatToParts(toDate(at))) if (part.type !== 'literal') p[part.type] = part.value;
  const two = (v: string | undefined) => (v ?? '00').padStart(2, '0');
  return {
    y: Number(p.year),
    mo: Number(p.month),
    d: Number(p.day),
    h: two(p.hour === '24' ? '00' : p.hour),
    mi: two(p.minute),
    s: two(p.second),
  };
}

/** "06:14" */
export const formatClock = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.h}:${p.mi}`;
};
/** "06:14:05" */
export const formatClockSeconds = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.h}:${p.mi}:${p.s}`;
};
/** "2 Dec 06:14" */
export const formatDayTime = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.d} ${MONTHS[p.mo - 1]} ${p.h}:${p.mi}`;
};
/** "2 Dec 06:14:05" */
export const formatDayTimeSeconds = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.d} ${MONTHS[p.mo - 1]} ${p.h}:${p.mi}:${p.s}`;
};
/** "2 Dec 2026" */
export const formatDate = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.d} ${MONTHS[p.mo - 1]} ${p.y}`;
};
/** "2 Dec 2026 06:14" — where the year matters (records, audit, printouts, CSV). */
export const formatDateTime = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.d} ${MONTHS[p.mo - 1]} ${p.y} ${p.h}:${p.mi}`;
};
/** "2 Dec 2026 06:14:05" */
export const formatDateTimeSeconds = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return `${p.d} ${MONTHS[p.mo - 1]} ${p.y} ${p.h}:${p.mi}:${p.s}`;
};

const dayKey = (at: Instant, timeZone: string) => {
  const p = partsOf(at, timeZone);
  return p.y * 10_000 + p.mo * 100 + p.d;
};

/** The clock alone when `at` falls on the same local day as `now`, else the day and clock. */
export function formatWhen(at: Instant, timeZone: string, now: Instant = Date.now()): string {
  const sameDay = dayKey(at, timeZone) === dayKey(now, timeZone);
  return sameDay ? formatClock(at, timeZone) : formatDayTime(at, timeZone);
}

/** A span of minutes in words: "45 min", "1 h 20 min", "2 d 3 h". */
export function formatMinutes(minutes: number): string {
  const m = Math.max(0, Math.floor(minutes));
  if (m < 60) return `${m} min`;
  if (m < 24 * 60) return m % 60 ? `${Math.floor(m / 60)} h ${m % 60} min` : `${m / 60} h`;
  const d = Math.floor(m / (24 * 60));
  const h = Math.floor((m % (24 * 60)) / 60);
  return h ? `${d} d ${h} h` : `${d} d`;
}

/** How old a value is: "40 s ago", "12 min ago", "1 h 20 min ago"; a time ahead of `now` reads "just now". */
export function formatAge(at: Instant, now: Instant = Date.now()): string {
  const seconds = Math.floor((toDate(now).getTime() - toDate(at).getTime()) / 1000);
  if (seconds < 5) return 'just now';
  if (seconds < 60) return `${seconds} s ago`;
  return `${formatMinutes(seconds / 60)} ago`;
}

/** Whole numbers grouped in thousands with a comma ("12,345"), whatever the browser's locale. */
export function formatCount(n: number): string {
  const s = String(Math.trunc(Math.abs(n)));
  return (n < 0 ? '-' : '') + s.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}
