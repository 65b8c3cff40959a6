/**
 * Reads a raw pleth strip: CSV with a header naming a time column (seconds) or a sample-index
 * column, and the red, infrared and dark channels (raw detector counts). Pure.
 */
import { parse } from 'csv-parse/sync';
import type { PlethStrip } from '~/lib/oxygenation/pleth.ts';
import { detectDelimiter } from '~/lib/imports/mapping.ts';

export const MAX_STRIP_BYTES = 2 * 1024 * 1024;
export const MAX_STRIP_SAMPLES = 60_000;
/** Pulse oximeter strips are sampled at tens to hundreds of Hz; above this a file is not a pleth strip (and the rate fits its column). */
export const MAX_SAMPLE_RATE_HZ = 10_000;
/** Sample times may wobble this much around the median spacing before the strip is refused. */
const SPACING_TOLERANCE = 0.05;

export class StripFileError extends Error {
  constructor(
    message: string,
    readonly line: number | null = null,
  ) {
    super(line === null ? message : `line ${line}: ${message}`);
  }
}

const NAMES = {
  time: ['time', 't', 'seconds', 'time_s', 'time (s)', 'sec'],
  index: ['sample', 'index', 'n', 'sample_index', 'i'],
  red: ['red', 'red_raw', 'r'],
  infrared: ['infrared', 'ir', 'ir_raw'],
  dark: ['dark', 'ambient', 'dark_raw'],
};

function find(headers: string[], names: string[]): number {
  return headers.findIndex((h) => names.includes(h.trim().toLowerCase()));
}

export interface StripParse {
  strip: PlethStrip;
  timeColumn: 'time' | 'index';
  samples: number;
  durationSec: number;
}

/** `sampleRateHz` is needed only when the strip has a sample-index column instead of times. */
export function parseStripCsv(text: string, sampleRateHz?: number): StripParse {
  const body = text.replace(/^\uFEFF/, '');
  const firstLine = body.slice(0, body.search(/\r?\n|$/));
  if (firstLine.trim() === '')
    throw new StripFileError('The strip is empty: a header row is needed (time or sample, red, infrared, dark).');
  let records: string[][];
  try {
    records = parse(body, {
      delimiter: detectDelimiter(firstLine),
      skip_empty_lines: true,
      relax_column_count: true,
      trim: true,
      to: MAX_STRIP_SAMPLES + 2,
    });
  } catch (err) {
    throw new StripFileError(`The strip is not readable as CSV: ${(err as Error).message}`);
  }
  const headers = records[0]!;
  const ti = find(headers, NAMES.time);
  const ii = find(headers, NAMES.index);
  const ri = find(headers, NAMES.red);
  const ir = find(headers, NAMES.infrared);
  const di = find(headers, NAMES.dark);
  const missing = [
    ti < 0 && ii < 0 ? 'time or sample' : null,
    ri < 0 ? 'red' : null,
    ir < 0 ? 'infrared' : null,
    di < 0 ? 'dark' : null,
  ].filter(Boolean);
  if (missing.length)
    throw new StripFileError(`The header needs columns: ${missing.join(', ')} (found: ${headers.join(', ')}).`);
  const n = records.length - 1;
  if (n > MAX_STRIP_SAMPLES) throw new StripFileError(`More than ${MAX_STRIP_SAMPLES} samples: cut the strip shorter.`);
  if (n < 2) throw new StripFileError('The strip has no samples.');

  const red: number[] = new Array(n);
  const infrared: number[] = new Array(n);
  const dark: number[] = new Array(n);
  const times: number[] = new Array(n);
  // Lines here count records; the header is line 1 and blank lines are not expected in a strip.
  for (let k = 1; k <= n; k++) {
    const rec = records[k]!;
    const num = (i: number, label: string) => {
      const v = Number(rec[i]);
      if (rec[i] === undefined || rec[i] === '' || !Number.isFinite(v))
        throw new StripFileError(`${label} "${rec[i] ?? ''}" is not a number`, k + 1);
      return v;
    };
    times[k - 1] = num(ti >= 0 ? ti : ii, ti >= 0 ? 'time' : 'sample');
    red[k - 1] = num(ri, 'red');
    infrared[k - 1] = num(ir, 'infrared');
    dark[k - 1] = num(di, 'dark');
  }

  let fs: number;
  if (ti >= 0) {
    const gaps = times.slice(1).map((t, i) => t - times[i]!);
    const sorted = [...gaps].sort((a, b) => a - b);
    const step = sorted[sorted.length >> 1]!;
    if (!(step > 0)) throw new StripFileError('Sample times do not increase.');
    const bad = gaps.findIndex((g) => Math.abs(g - step) > step * SPACING_TOLERANCE);
    if (bad >= 0)
      throw new StripFileError(
        `sample spacing ${gaps[bad]!.toFixed(4)} s differs from the strip's ${step.toFixed(4)} s: samples must be evenly spaced`,
        bad + 3,
      );
    // Rounded to the millihertz so float steps such as 0.01 give 100 Hz, not 100.000000000002.
    fs = Math.round(((n - 1) / (times[n - 1]! - times[0]!)) * 1000) / 1000;
  } else {
    if (!(sampleRateHz && sampleRateHz > 0))
      throw new StripFileError('This strip counts samples instead of times: give its sample rate in Hz.');
    const bad = times.findIndex((t, i) => i > 0 && t !== times[i - 1]! + 1);
    if (bad >= 0) throw new StripFileError(`sample ${times[bad]} does not follow ${times[bad - 1]}`, bad + 2);
    fs = sampleRateHz;
  }
  if (fs > MAX_SAMPLE_RATE_HZ)
    throw new StripFileError(`The strip is sampled at ${fs} Hz; at most ${MAX_SAMPLE_RATE_HZ} Hz is accepted.`);
  return {
    strip: { sampleRateHz: fs, red, infrared, dark },
    timeColumn: ti >= 0 ? 'time' : 'index',
    samples: n,
    durationSec: n / fs,
  };
}
