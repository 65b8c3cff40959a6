/**
 * Parses a monitor trend file (CSV with a header row) with a column mapping into readings, and
 * lists every row it refuses with its line number and reason. Pure: no IO, no clock.
 */
import { parse } from 'csv-parse/sync';
import { TRACE_QUALITIES, type TraceQuality } from '~/lib/oxygenation/types.ts';
import { isValidWallTime, resolveRepeated, wallTimeText, zoneResolver } from './local-time.ts';
import { detectDelimiter, type TrendMapping } from './mapping.ts';
import { READING_LIMITS, defaultTrace } from './reading.ts';
import { parseTimeText } from './time-text.ts';

export { MAX_TREND_FILE_BYTES } from './mapping.ts';
export const MAX_TREND_ROWS = 200_000;

export interface TrendRow { line: number; at: number; spo2: number | null; heartRate: number | null; perfusionIndex: number | null; trace: TraceQuality }
export interface RowProblem { line: number; reason: string }

export interface TrendParse {
  headers: string[];
  /** Data rows in the file (the header and blank lines not counted). */
  rowCount: number;
  rows: TrendRow[];
  refused: RowProblem[];
  /** Rows taken but worth knowing about (a repeated autumn hour resolved by order). */
  notes: RowProblem[];
}

/** The whole file cannot be read: no header, a mapped column missing, not CSV at all. */
export class TrendFileError extends Error {
  constructor(message: string, readonly field = 'file') {
    super(message);
  }
}

const EMPTY = /^-*$|^\?$/;

function numberCell(raw: string | undefined, label: string, lim: { min: number; max: number }, unit: string, whole: boolean): number | null | string {
  const text = (raw ?? '').trim();
  if (EMPTY.test(text)) return null;
  const v = Number(text);
  if (!Number.isFinite(v)) return `${label} "${text}" is not a number`;
  if (whole && !Number.isInteger(v)) return `${label} ${text} is not a whole number`;
  if (v < lim.min) return `${label} ${text} is under ${lim.min}${unit}`;
  if (v > lim.max) return `${label} ${text} is over ${lim.max}${unit}`;
  return v;
}

const QUALITY_WORDS = new Set<string>(TRACE_QUALITIES);

export function parseTrendCsv(text: string, mapping: TrendMapping, timeZone: string): TrendParse {
  const body = text.replace(/^\uFEFF/, '');
  const firstLine = body.slice(0, body.search(/\r?\n|$/));
  if (firstLine.trim() === '') throw new TrendFileError('The file is empty or its first line is blank: a header row is needed.');
  let records: string[][];
  try {
    // Blank lines are kept as records and skipped below, so line numbers can be counted without
    // csv-parse's per-record info object (which costs a third of the parse on a day-long file).
    records = parse(body, { delimiter: detectDelimiter(firstLine), skip_empty_lines: false, relax_column_count: true, to: MAX_TREND_ROWS + 2 });
  } catch (err) {
    throw new TrendFileError(`The file is not readable as CSV: ${(err as Error).message}`);
  }
  const headers = records[0]!.map((h) => h.trim());
  const col = (name: string | null, key: string): number => {
    if (name === null) return -1;
    const i = headers.indexOf(name);
    if (i < 0) throw new TrendFileError(`Column "${name}" is not in the file's header (${headers.join(', ')}).`, key);
    return i;
  };
  const ti = col(mapping.time, 'time');
  const si = col(mapping.spo2, 'spo2');
  const hi = col(mapping.heartRate, 'heartRate');
  const pi = col(mapping.perfusionIndex, 'perfusionIndex');
  const qi = col(mapping.quality, 'quality');
  if (records.length - 1 > MAX_TREND_ROWS) throw new TrendFileError(`More than ${MAX_TREND_ROWS.toLocaleString('en-GB')} rows: split the file.`);
  const isBlank = (r: string[]) => r.length === 1 && r[0]!.trim() === '';

  const resolve = mapping.timeMode === 'local' ? zoneResolver(timeZone) : null;
  const rows: TrendRow[] = [];
  const refused: RowProblem[] = [];
  const notes: RowProblem[] = [];
  const lineOfTime = new Map<number, number>();
  let previousAt: number | null = null;
  // One note where a repeated hour's pass starts, not one per reading in it.
  let lastChoice: 'first' | 'second' | null = null;

  let rowCount = 0;
  // Line of the record being read: one per record, plus the line breaks inside quoted cells before it.
  let line = 1;
  for (const cell of records[0]!) if (cell.includes('\n')) line += cell.split('\n').length - 1;
  for (let k = 1; k < records.length; k++) {
    const record = records[k]!;
    line += 1;
    const recordLine = line;
    for (const cell of record) if (cell.includes('\n')) line += cell.split('\n').length - 1;
    if (isBlank(record)) continue;
    rowCount++;
    const refuse = (reason: string) => refused.push({ line: recordLine, reason });

    const timeText = (record[ti] ?? '').trim();
    if (timeText === '') { refuse('time is missing'); continue; }
    const parsed = parseTimeText(timeText);
    if (!parsed || !isValidWallTime(parsed.wall)) { refuse(`time "${timeText}" is not a date and time this import understands`); continue; }
    let at: number;
    if (mapping.timeMode === 'iso') {
      if (parsed.offsetMs === null) { refuse(`time "${timeText}" has no offset (Z or ±hh:mm); choose "unit local time" for times without one`); continue; }
      const w = parsed.wall;
      at = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s, w.ms) - parsed.offsetMs;
    } else {
      if (parsed.offsetMs !== null) { refuse(`time "${timeText}" carries an offset; choose "ISO 8601 with offset" for this file`); continue; }
      const r = resolve!(parsed.wall);
      if (r.kind === 'gap') { refuse(`time ${wallTimeText(parsed.wall)} does not exist in ${timeZone} (the clocks went forward)`); continue; }
      if (r.kind === 'ambiguous') {
        at = resolveRepeated(r, previousAt);
        const choice = at === r.earlier ? 'first' : 'second';
        if (choice !== lastChoice) {
          notes.push({ line: recordLine, reason: `from ${wallTimeText(parsed.wall)} the times happen twice in ${timeZone} (the clocks went back); taken as the ${choice === 'first' ? 'first pass (summer time)' : 'second pass (standard time)'} by the file's order` });
        }
        lastChoice = choice;
      } else {
        at = r.at;
        lastChoice = null;
      }
    }

    const spo2 = numberCell(record[si], 'SpO₂', READING_LIMITS.spo2, ' %', true);
    if (typeof spo2 === 'string') { refuse(spo2); continue; }
    const heartRate = numberCell(record[hi], 'Heart rate', READING_LIMITS.heartRate, '/min', true);
    if (typeof heartRate === 'string') { refuse(heartRate); continue; }
    const perfusionIndex = pi < 0 ? null : numberCell(record[pi], 'Perfusion index', READING_LIMITS.perfusionIndex, ' %', false);
    if (typeof perfusionIndex === 'string') { refuse(perfusionIndex); continue; }
    let trace = defaultTrace(spo2);
    let traceGiven = false;
    if (qi >= 0) {
      const q = (record[qi] ?? '').trim().toLowerCase();
      if (q !== '') {
        if (!QUALITY_WORDS.has(q)) { refuse(`quality "${record[qi]}" is not one of ${TRACE_QUALITIES.join(', ')}`); continue; }
        trace = q as TraceQuality;
        traceGiven = true;
      }
    }
    // As in the feed: an empty row stands for a probe off only when its quality says "absent".
    if (spo2 === null && heartRate === null && !(traceGiven && trace === 'absent')) { refuse('no SpO₂ and no heart rate'); continue; }
    const earlier = lineOfTime.get(at);
    if (earlier !== undefined) { refuse(`same time as line ${earlier}`); continue; }
    lineOfTime.set(at, recordLine);
    previousAt = at;
    rows.push({ line: recordLine, at, spo2, heartRate, perfusionIndex, trace });
  }
  return { headers, rowCount, rows, refused, notes };
}
