/**
 * ISO 8601 date-times as the API takes them: a zone (Z or ±hh:mm) and a date that exists.
 * `Date.parse('2026-11-31T12:00:00Z')` quietly reads 1 December; this refuses it.
 */
const ISO = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(Z|[+-](\d{2}):?(\d{2}))$/i;

export function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

export function isRealCalendarDate(year: number, month: number, day: number): boolean {
  return year >= 1 && month >= 1 && month <= 12 && day >= 1 && day <= daysInMonth(year, month);
}

export function isRealIsoDateTime(text: string): boolean {
  const m = ISO.exec(text);
  if (!m) return false;
  const [, y, mo, d, h, mi, s, zone, oh, om] = m;
  if (!isRealCalendarDate(Number(y), Number(mo), Number(d))) return false;
  if (Number(h) > 23 || Number(mi) > 59 || Number(s ?? 0) > 59) return false;
  if (zone.toUpperCase() !== 'Z' && (Number(oh) > 14 || Number(om) > 59)) return false;
  return !Number.isNaN(Date.parse(text));
}

/** YYYY-MM-DD that exists on the calendar. */
export function isRealIsoDate(text: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  return m !== null && isRealCalendarDate(Number(m[1]), Number(m[2]), Number(m[3]));
}

/** A stored instant as the API sends it (ISO 8601, UTC); null stays null. */
export function toIso(d: Date | number | string): string;
export function toIso(d: Date | number | string | null | undefined): string | null;
export function toIso(d: Date | number | string | null | undefined): string | null {
  return d === null || d === undefined ? null : new Date(d).toISOString();
}
