import { describe, expect, it } from 'vitest';
import { palette } from './palette.mjs';
import { contrastRatio } from './contrast.ts';

const c = palette as Record<string, Record<string, string>>;
const white = '#ffffff';

// WCAG 2.1 AA: 4.5:1 for text, 3:1 for large text and for shapes that carry meaning (1.4.3, 1.4.11).
// The pairs are the ward board's, by day and by night (src/components/board/BoardView.tsx).
const text: [string, string, string][] = [
  ['day: tile text on an in-band tile', c.ink[900]!, white],
  ['day: labels on a tile', c.ink[500]!, white],
  ['day: labels on a below-band tile', c.ink[500]!, c.coral[50]!],
  ['day: labels on an above-band tile', c.ink[500]!, c.iris[50]!],
  ['day: empty bed', c.ink[500]!, c.ink[50]!],
  ['night: tile text', c.ink[100]!, c.ink[900]!],
  ['night: labels on a tile', c.ink[300]!, c.ink[900]!],
  ['night: empty bed', c.ink[400]!, c.ink[950]!],
  ['night: as-of line and notes', c.ink[300]!, c.ink[950]!],
];
const shapes: [string, string, string][] = [
  ['day: below-band chevron', c.coral[600]!, c.coral[50]!],
  ['day: above-band chevron', c.iris[600]!, c.iris[50]!],
  ['day: in-band dot', c.glass[600]!, white],
  ['night: below-band chevron', c.coral[300]!, c.ink[900]!],
  ['night: above-band chevron', c.iris[300]!, c.ink[900]!],
  ['night: in-band dot', c.glass[300]!, c.ink[900]!],
];

describe('board contrast (WCAG 2.1 AA)', () => {
  it('computes the published reference: black on white is 21:1', () => {
    expect(contrastRatio('#000000', white)).toBeCloseTo(21, 5);
    expect(contrastRatio(white, white)).toBe(1);
  });
  it.each(text)('%s reaches 4.5:1', (_name, fg, bg) => {
    expect(contrastRatio(fg, bg)).toBeGreaterThanOrEqual(4.5);
  });
  it.each(shapes)('%s reaches 3:1', (_name, fg, bg) => {
    expect(contrastRatio(fg, bg)).toBeGreaterThanOrEqual(3);
  });
});
