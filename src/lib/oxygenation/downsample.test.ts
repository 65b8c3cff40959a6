import { describe, expect, it } from 'vitest';
import { belowBandRunEdges, keepBelowBandRunEdges, lttb } from './downsample';
import { ComputationInputError } from './errors';
import type { Reading } from './types';

type P = [number, number];
const px = (p: P) => p[0];
const py = (p: P) => p[1];

describe('lttb (Steinarsson 2013, largest-triangle-three-buckets)', () => {
  it('picks the largest triangle in each bucket (worked by hand)', () => {
    // n = 6, threshold 4 → buckets of 2. Bucket 1 {1,2} against A=(0,0) and the next bucket's
    // mean (3.5, 2.5): areas 1 and 5 → index 2. Bucket 2 {3,4} against A=(2,0) and (5,0):
    // areas 15 and 0 → index 3.
    const pts: P[] = [
      [0, 0],
      [1, 1],
      [2, 0],
      [3, 5],
      [4, 0],
      [5, 0],
    ];
    expect(lttb(pts, 4, px, py)).toEqual([pts[0], pts[2], pts[3], pts[5]]);
  });

  it('keeps first and last, returns exactly threshold points and keeps a lone spike', () => {
    const pts: P[] = Array.from({ length: 10_000 }, (_, i) => [i, i === 4321 ? 50 : 95]);
    const out = lttb(pts, 100, px, py);
    expect(out).toHaveLength(100);
    expect(out[0]).toBe(pts[0]);
    expect(out[99]).toBe(pts[9999]);
    expect(out).toContain(pts[4321]);
    for (let i = 1; i < out.length; i++) expect(out[i]![0]).toBeGreaterThan(out[i - 1]![0]);
  });

  it('always keeps the points asked for, and stays within threshold', () => {
    const pts: P[] = Array.from({ length: 5000 }, (_, i) => [i, 95 + Math.sin(i / 50)]);
    const must = new Set([17, 1234, 1235, 4998]);
    const out = lttb(pts, 50, px, py, (_p, i) => must.has(i));
    for (const i of must) expect(out).toContain(pts[i]);
    expect(out.length).toBeLessThanOrEqual(50);
    const many = lttb(pts, 10, px, py, (_p, i) => i % 100 === 0 && i > 0);
    expect(many).toHaveLength(1 + 49 + 1); // more keeps than budget: first + kept + last
  });

  it('returns a copy when there are no more points than the threshold', () => {
    const pts: P[] = [
      [0, 1],
      [1, 2],
    ];
    const out = lttb(pts, 3, px, py);
    expect(out).toEqual(pts);
    expect(out).not.toBe(pts);
    expect(lttb([], 3, px, py)).toEqual([]);
  });

  it('throws on a threshold under 3, non-finite values and x going backwards', () => {
    expect(() => lttb([], 2, px, py)).toThrowError(ComputationInputError);
    expect(() => lttb([], 10.5, px, py)).toThrowError(ComputationInputError);
    expect(() => lttb([[0, Number.NaN]] as P[], 3, px, py)).toThrowError(ComputationInputError);
    expect(() =>
      lttb(
        [
          [1, 1],
          [0, 1],
        ] as P[],
        3,
        px,
        py,
      ),
    ).toThrowError(ComputationInputError);
  });
});

describe('below-band run edges (kept through downsampling)', () => {
  const T0 = Date.UTC(2025, 0, 1);
  const r = (sec: number, spo2: number, trace: Reading['trace'] = 'clean'): Reading => ({
    at: T0 + sec * 1000,
    spo2,
    trace,
    source: 'device',
  });
  const orders = [{ from: T0, low: 92, high: 96 }];

  it('flags the first and last trusted reading of each run; untrusted readings do not break a run', () => {
    const readings = [
      r(0, 95),
      r(1, 90),
      r(2, 91),
      r(3, 97, 'noisy'),
      r(4, 89),
      r(5, 94),
      r(6, 91),
      r(7, 94),
      r(8, 90),
    ];
    expect(Array.from(belowBandRunEdges(readings, orders))).toEqual([0, 1, 0, 0, 1, 0, 1, 0, 1]);
  });

  it('ends a run where a new order puts the patient in band', () => {
    const readings = [r(0, 90), r(1, 90), r(2, 90)];
    const flags = belowBandRunEdges(readings, [
      { from: T0, low: 92, high: 96 },
      { from: T0 + 2000, low: 88, high: 92 },
    ]);
    expect(Array.from(flags)).toEqual([1, 1, 0]);
  });

  it('feeds lttb so a short desaturation survives a 72 h downsample', () => {
    const readings = Array.from({ length: 20_000 }, (_, i) => r(i, i >= 12_345 && i < 12_350 ? 90 : 95));
    const out = lttb(
      readings,
      200,
      (p) => p.at,
      (p) => p.spo2 ?? 0,
      keepBelowBandRunEdges(readings, orders),
    );
    expect(out).toContain(readings[12_345]);
    expect(out).toContain(readings[12_349]);
  });
});
