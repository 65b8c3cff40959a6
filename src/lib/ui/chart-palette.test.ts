import { describe, expect, it } from 'vitest';
import { CHART_COLOURS, MEANINGFUL_SERIES } from './chart-palette.ts';
import { contrastRatio } from './contrast.ts';

// WCAG 2.1 1.4.11 non-text contrast: graphical objects needed to understand the content ≥ 3:1
// against adjacent colours — here the chart panel's background, by day and by night.
describe('bed chart colours (WCAG 2.1 1.4.11)', () => {
  for (const mode of ['day', 'night'] as const) {
    const colours = CHART_COLOURS[mode];
    for (const series of MEANINGFUL_SERIES) {
      it(`${mode}: ${series} meets 3:1 against the panel`, () => {
        expect(contrastRatio(colours[series], colours.background)).toBeGreaterThanOrEqual(3);
      });
    }
  }

  it('by night SpO₂ is the line that stands out most, above heart rate and FiO₂', () => {
    const n = CHART_COLOURS.night;
    const ratio = (k: 'spo2' | 'hr' | 'fio2') => contrastRatio(n[k], n.background);
    expect(ratio('spo2')).toBeGreaterThan(ratio('hr'));
    expect(ratio('spo2')).toBeGreaterThan(ratio('fio2'));
  });

  it('below, above and in band differ from each other (shape tells them apart too)', () => {
    for (const mode of ['day', 'night'] as const) {
      const k = CHART_COLOURS[mode];
      expect(new Set([k.below, k.above, k.inBand]).size).toBe(3);
    }
  });
});
