/**
 * Which columns of a monitor trend file hold what, and how its times are written. Shared by the
 * upload form (browser) and the server; remembered per unit after a commit.
 */
import { z } from 'zod';

/** A day of one-per-second readings with every column fits well inside this. */
export const MAX_TREND_FILE_BYTES = 20 * 1024 * 1024;

export const TIME_MODES = ['iso', 'local'] as const;
export type TimeMode = (typeof TIME_MODES)[number];

const column = (label: string) =>
  z
    .string({ required_error: `Choose the ${label} column` })
    .trim()
    .min(1, `Choose the ${label} column`)
    .max(100);
const optionalColumn = z.preprocess(
  (v) => (v === '' || v === undefined ? null : v),
  z.string().trim().max(100).nullable(),
);

export const trendMappingSchema = z
  .object({
    time: column('time'),
    spo2: column('SpO₂'),
    heartRate: column('heart rate'),
    perfusionIndex: optionalColumn.default(null),
    quality: optionalColumn.default(null),
    timeMode: z.enum(TIME_MODES, {
      errorMap: () => ({ message: 'Choose how times are written: ISO 8601 with offset, or unit local time' }),
    }),
  })
  .superRefine((m, ctx) => {
    const used = new Map<string, string>();
    for (const key of ['time', 'spo2', 'heartRate', 'perfusionIndex', 'quality'] as const) {
      const col = m[key];
      if (!col) continue;
      if (used.has(col))
        ctx.addIssue({
          code: z.ZodIssueCode.custom,
          path: [key],
          message: `Column "${col}" is already used for ${used.get(col)}`,
        });
      else used.set(col, key);
    }
  });
export type TrendMapping = z.output<typeof trendMappingSchema>;

const GUESSES: [keyof Omit<TrendMapping, 'timeMode'>, RegExp][] = [
  ['time', /^(time|date|datetime|timestamp|date ?time|recorded|when)\b/i],
  ['spo2', /^(spo2|sp02|spo₂|sat|sats|saturation|o2 ?sat)/i],
  ['heartRate', /^(hr|heart|pulse|pr|bpm)\b|heart ?rate|pulse ?rate/i],
  ['perfusionIndex', /^(pi|perf)|perfusion/i],
  ['quality', /qual|sqi|trace|signal/i],
];

/** A first guess from the header names; the nurse confirms or changes it in the form. */
export function guessMapping(headers: string[]): Partial<TrendMapping> {
  const out: Partial<Record<string, string>> = {};
  for (const [key, re] of GUESSES) {
    const hit = headers.find((h) => re.test(h.trim()) && !Object.values(out).includes(h));
    if (hit) out[key] = hit;
  }
  return out as Partial<TrendMapping>;
}

/** A remembered mapping applies to a file only when every column it names is in the header. */
export function mappingFits(m: TrendMapping, headers: string[]): boolean {
  return [m.time, m.spo2, m.heartRate, m.perfusionIndex, m.quality].every((c) => c === null || headers.includes(c));
}

/** The delimiter of a header line: comma unless the line has semicolons or tabs and no commas. */
export function detectDelimiter(headerLine: string): ',' | ';' | '\t' {
  if (headerLine.includes(',')) return ',';
  if (headerLine.includes(';')) return ';';
  if (headerLine.includes('\t')) return '\t';
  return ',';
}

/** The header names of a file's first line (the browser reads only the first few kB). */
export function headerNames(firstLine: string): string[] {
  const line = firstLine.replace(/^\uFEFF/, '').split(/\r?\n/)[0] ?? '';
  const d = detectDelimiter(line);
  return line
    .split(d)
    .map((h) =>
      h
        .trim()
        .replace(/^"(.*)"$/, '$1')
        .trim(),
    )
    .filter((h) => h.length > 0);
}
