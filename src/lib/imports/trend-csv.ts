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
import { formatCount } from '~/lib/time/format.ts';

export { MAX_TREND_FILE_BYTES } from './mapping.ts';
export const MAX_TREND_ROWS = 200_000;

export interface TrendRow {
  line: number;
  at: number;
  spo2: number | null;
  heartRate: number | null;
  perfusionIndex: number | null;
  trace: TraceQuality;
}
export interface RowProblem {
  line: number;
  reason: string;
  /** The reason without the row's value, so refusals can be grouped ("quality is not one of …"). */
  group?: string;
  /** The mapping key whose column held the value refused (time, spo2, heartRate, perfusionIndex, quality). */
  field?: MappedField;
}
export type MappedField = 'time' | 'spo2' | 'heartRate' | 'perfusionIndex' | 'quality';

/** Refused rows of one reason: how many, and the first line numbers. */
export interface RefusalGroup {
  reason: string;
  field: MappedField | null;
  count: number;
  firstLines: number[];
}

/** A mapped column whose values mostly do not fit what it was mapped as: offer to leave it unmapped. */
export interface UnfitColumn {
  field: MappedField;
  column: string;
  refused: number;
  examples: string[] /** Optional columns (perfusion index, quality) may be left unmapped; SpO₂ and heart rate need another column. */;
  canUnmap: boolean;
}

export interface TrendParse {
  headers: string[];
  /** Data rows in the file (the header and blank lines not counted). */
  rowCount: number;
  rows: TrendRow[];
  refused: RowProblem[];
  /** Rows taken but worth knowing about (a repeated autumn hour resolved by order). */
  notes: RowProblem[];
  /** Mapped columns whose values refused at least half the rows (never the time column: it cannot be left out). */
  unfitColumns: UnfitColumn[];
}

/** Groups refusals by reason (largest group first), each with its count and first `keep` line numbers. */
export function groupRefusals(refused: RowProblem[], keep = 5): RefusalGroup[] {
  const groups = new Map<string, RefusalGroup>();
  for (const r of refused) {
    const key = r.group ?? r.reason;
    let g = groups.get(key);
    if (!g) {
      g = { reason: key, field: r.field ?? null, count: 0, firstLines: [] };
      groups.set(key, g);
    }
    g.count += 1;
    if (g.firstLines.length < keep) g.firstLines.push(r.line);
  }
  return [...groups.values()].sort((a, b) => b.count - a.count || a.firstLines[0]! - b.firstLines[0]!);
}

/** The whole file cannot be read: no header, a mapped column missing, not CSV at all. */
export class TrendFileError extends Error {
  constructor(
    message: string,
    readonly field = 'file',
  ) {
    super(message);
  }
}

const EMPTY = /^-*$|^\?$/;

interface CellProblem {
  reason: string;
  group: string;
}
function numberCell(
  raw: string | undefined,
  label: string,
  lim: { min: number; max: number },
  unit: string,
  whole: boolean,
): number | null | CellProblem {
  const text = (raw ?? '').trim();
  if (EMPTY.test(text)) return null;
  const v = Number(text);
  if (!Number.isFinite(v)) return { reason: `${label} "${text}" is not a number`, group: `${label} is not a number` };
  if (whole && !Number.isInteger(v))
    return { reason: `${label} ${text} is not a whole number`, group: `${label} is not a whole number` };
  if (v < lim.min)
    return { reason: `${label} ${text} is under ${lim.min}${unit}`, group: `${label} under ${lim.min}${unit}` };
  if (v > lim.max)
    return { reason: `${label} ${text} is over ${lim.max}${unit}`, group: `${label} over ${lim.max}${unit}` };
  return v;
}
const isProblem = (v: unknown): v is CellProblem => typeof v === 'object' && v !== null;

const QUALITY_WORDS = new Set<string>(TRACE_QUALITIES);

export function parseTrendCsv(text: string, mapping: TrendMapping, timeZone: string): TrendParse {
  const body = text.replace(/^\uFEFF/, '');
  const firstLine = body.slice(0, body.search(/\r?\n|$/));
  if (firstLine.trim() === '')
    throw new TrendFileError('The file is empty or its first line is blank: a header row is needed.');
  let records: string[][];
  try {
    // Blank lines are kept as records and skipped below, so line numbers can be counted without
    // csv-parse's per-record info object (which costs a third of the parse on a day-long file).
    records = parse(body, {
      delimiter: detectDelimiter(firstLine),
      skip_empty_lines: false,
      relax_column_count: true,
      to: MAX_TREND_ROWS + 2,
    });
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
  if (records.length - 1 > MAX_TREND_ROWS)
    throw new TrendFileError(`More than ${formatCount(MAX_TREND_ROWS)} rows: split the file.`);
  const isBlank = (r: string[]) => r.length === 1 && r[0]!.trim() === '';

  const resolve = mapping.timeMode === 'local' ? zoneResolver(timeZone) : null;
  const rows: TrendRow[] = [];
  const refused: RowProblem[] = [];
  const notes: RowProblem[] = [];
  const lineOfTime = new Map<number, number>();
  const badValues: Partial<Record<MappedField, string[]>> = {};
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
    const refuse = (reason: string, group?: string, field?: MappedField, value?: string) => {
      refused.push({ line: recordLine, reason, ...(group ? { group } : {}), ...(field ? { field } : {}) });
      if (field && value !== undefined) {
        badValues[field] ??= [];
        const ex = badValues[field];
        if (ex.length < 3 && !ex.includes(value)) ex.push(value);
      }
    };

    const timeText = (record[ti] ?? '').trim();
    if (timeText === '') {
      refuse('time is missing', undefined, 'time');
      continue;
    }
    const parsed = parseTimeText(timeText);
    if (!parsed || !isValidWallTime(parsed.wall)) {
      refuse(
        `time "${timeText}" is not a date and time this import understands`,
        'time is not a date and time this import understands',
        'time',
        timeText,
      );
      continue;
    }
    let at: number;
    if (mapping.timeMode === 'iso') {
      if (parsed.offsetMs === null) {
        refuse(
          `time "${timeText}" has no offset (Z or ±hh:mm); choose "unit local time" for times without one`,
          'time has no offset (Z or ±hh:mm); choose "unit local time" for times without one',
          'time',
          timeText,
        );
        continue;
      }
      const w = parsed.wall;
      at = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s, w.ms) - parsed.offsetMs;
    } else {
      if (parsed.offsetMs !== null) {
        refuse(
          `time "${timeText}" carries an offset; choose "ISO 8601 with offset" for this file`,
          'time carries an offset; choose "ISO 8601 with offset" for this file',
          'time',
          timeText,
        );
        continue;
      }
      const r = resolve!(parsed.wall);
      if (r.kind === 'gap') {
        refuse(
          `time ${wallTimeText(parsed.wall)} does not exist in ${timeZone} (the clocks went forward)`,
          `time does not exist in ${timeZone} (the clocks went forward)`,
        );
        continue;
      }
      if (r.kind === 'ambiguous') {
        at = resolveRepeated(r, previousAt);
        const choice = at === r.earlier ? 'first' : 'second';
        if (choice !== lastChoice) {
          notes.push({
            line: recordLine,
            reason: `from ${wallTimeText(parsed.wall)} the times happen twice in ${timeZone} (the clocks went back); taken as the ${choice === 'first' ? 'first pass (summer time)' : 'second pass (standard time)'} by the file's order`,
          });
        }
        lastChoice = choice;
      } else {
        at = r.at;
        lastChoice = null;
      }
    }

    const spo2 = numberCell(record[si], 'SpO₂', READING_LIMITS.spo2, ' %', true);
    if (isProblem(spo2)) {
      refuse(spo2.reason, spo2.group, 'spo2', (record[si] ?? '').trim());
      continue;
    }
    const heartRate = numberCell(record[hi], 'Heart rate', READING_LIMITS.heartRate, '/min', true);
    if (isProblem(heartRate)) {
      refuse(heartRate.reason, heartRate.group, 'heartRate', (record[hi] ?? '').trim());
      continue;
    }
    const perfusionIndex =
      pi < 0 ? null : numberCell(record[pi], 'Perfusion index', READING_LIMITS.perfusionIndex, ' %', false);
    if (isProblem(perfusionIndex)) {
      refuse(perfusionIndex.reason, perfusionIndex.group, 'perfusionIndex', (record[pi] ?? '').trim());
      continue;
    }
    let trace = defaultTrace(spo2);
    let traceGiven = false;
    if (qi >= 0) {
      const q = (record[qi] ?? '').trim().toLowerCase();
      if (q !== '') {
        if (!QUALITY_WORDS.has(q)) {
          refuse(
            `quality "${record[qi]}" is not one of ${TRACE_QUALITIES.join(', ')}`,
            `quality is not one of ${TRACE_QUALITIES.join(', ')}`,
            'quality',
            (record[qi] ?? '').trim(),
          );
          continue;
        }
        trace = q as TraceQuality;
        traceGiven = true;
      }
    }
    // As in the feed: an empty row stands for a probe off only when its quality says "absent".
    if (spo2 === null && heartRate === null && !(traceGiven && trace === 'absent')) {
      refuse('no SpO₂ and no heart rate');
      continue;
    }
    const earlier = lineOfTime.get(at);
    if (earlier !== undefined) {
      refuse(`same time as line ${earlier}`, 'same time as an earlier line');
      continue;
    }
    lineOfTime.set(at, recordLine);
    previousAt = at;
    rows.push({ line: recordLine, at, spo2, heartRate, perfusionIndex, trace });
  }
  const unfitColumns: UnfitColumn[] = [];
  for (const field of ['spo2', 'heartRate', 'perfusionIndex', 'quality'] as const) {
    const column = mapping[field];
    const n = refused.filter((r) => r.field === field).length;
    if (column && n > 0 && n * 2 >= rowCount)
      unfitColumns.push({
        field,
        column,
        refused: n,
        examples: badValues[field] ?? [],
        canUnmap: field === 'perfusionIndex' || field === 'quality',
      });
  }
  return { headers, rowCount, rows, refused, notes, unfitColumns };
}
