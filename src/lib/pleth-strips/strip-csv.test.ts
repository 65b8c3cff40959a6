import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analysePlethStrip } from '~/lib/oxygenation/index.ts';
import { StripFileError, parseStripCsv } from './strip-csv.ts';
import { EXAMPLE_STRIPS, exampleStripCsv } from './strip-synth.ts';

const shipped = (name: string) => readFileSync(new URL(`../../../public/strips/${name}.csv`, import.meta.url), 'utf8');

describe('pleth strip files', () => {
  it('reads times in seconds and takes the sample rate from them', () => {
    const p = parseStripCsv('time,red,infrared,dark\n0.00,100,200,5\n0.01,101,201,5\n0.02,102,202,6\n');
    expect(p.strip.sampleRateHz).toBe(100);
    expect(p.strip.red).toEqual([100, 101, 102]);
    expect(p.timeColumn).toBe('time');
  });

  it('reads a sample index when given the rate, and asks for the rate otherwise', () => {
    const csv = 'sample;IR;Red;Dark\n0;200;100;5\n1;201;101;5\n';
    expect(parseStripCsv(csv, 250).strip).toEqual({
      sampleRateHz: 250,
      red: [100, 101],
      infrared: [200, 201],
      dark: [5, 5],
    });
    expect(() => parseStripCsv(csv)).toThrow(/sample rate/);
  });

  it('refuses uneven spacing, non-numbers and missing channels with the line', () => {
    expect(() => parseStripCsv('time,red,infrared,dark\n0,1,1,0\n0.01,1,1,0\n0.02,1,1,0\n0.06,1,1,0\n')).toThrow(
      'line 5: sample spacing',
    );
    expect(() => parseStripCsv('time,red,infrared,dark\n0,1,1,0\n0.01,x,1,0\n')).toThrow(
      'line 3: red "x" is not a number',
    );
    expect(() => parseStripCsv('time,red,dark\n0,1,0\n')).toThrow(StripFileError);
  });

  it('ships example strips that the generator reproduces, with the verdict each is meant to show', () => {
    const expected = { clean: 'trustworthy', motion: 'doubtful', 'low-perfusion': 'doubtful' } as const;
    for (const spec of EXAMPLE_STRIPS) {
      const text = shipped(spec.name);
      expect(text, spec.name).toBe(exampleStripCsv(spec));
      const a = analysePlethStrip(parseStripCsv(text).strip);
      expect(a.verdict, spec.name).toBe(expected[spec.name]);
      // The synthesis saturation comes back through the same Beer–Lambert curve, within a point.
      expect(Math.abs(a.spo2! - spec.spo2), spec.name).toBeLessThan(1);
      expect(Math.abs(a.heartRate! - spec.heartRate), spec.name).toBeLessThan(3);
    }
    expect(analysePlethStrip(parseStripCsv(shipped('motion')).strip).reasons.join(' ')).toMatch(/motion/);
    expect(analysePlethStrip(parseStripCsv(shipped('low-perfusion')).strip).reasons.join(' ')).toMatch(
      /perfusion index/,
    );
  });
});
