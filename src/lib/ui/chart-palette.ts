/**
 * The bed chart's colours by day and by night, from the one palette. Each series is checked for
 * WCAG 2.1 non-text contrast (1.4.11, ≥ 3:1) against its panel's background (chart-palette.test.ts).
 * By night SpO₂ is the brightest line; heart rate and oxygen sit in their own panels, quieter.
 */
import { palette } from './palette.mjs';

const c = palette as Record<string, Record<string, string>>;

export interface ChartColours {
  background: string;
  spo2: string;
  inBand: string;
  below: string;
  above: string;
  untrusted: string;
  envelope: string;
  bandEdge: string;
  bandFill: string;
  hr: string;
  fio2: string;
  escalation: string;
  cursor: string;
  grid: string;
  axis: string;
  extra: string;
}

export const CHART_COLOURS: { day: ChartColours; night: ChartColours } = {
  day: {
    background: '#ffffff',
    spo2: c.ink[800]!,
    inBand: c.glass[600]!,
    below: c.coral[600]!,
    above: c.iris[600]!,
    untrusted: c.ink[500]!,
    envelope: c.ink[400]!,
    bandEdge: c.glass[600]!,
    bandFill: c.glass[200]!,
    hr: c.ink[600]!,
    fio2: c.amberline[700]!,
    escalation: c.coral[700]!,
    cursor: c.ink[600]!,
    grid: c.ink[200]!,
    axis: c.ink[700]!,
    extra: c.iris[800]!,
  },
  night: {
    background: c.ink[900]!,
    spo2: c.ink[50]!,
    inBand: c.glass[300]!,
    below: c.coral[300]!,
    above: c.iris[300]!,
    untrusted: c.ink[300]!,
    envelope: c.ink[400]!,
    bandEdge: c.glass[400]!,
    bandFill: c.glass[800]!,
    hr: c.ink[300]!,
    fio2: c.amberline[400]!,
    escalation: c.coral[400]!,
    cursor: c.ink[200]!,
    grid: c.ink[700]!,
    axis: c.ink[200]!,
    extra: c.iris[200]!,
  },
};

/** The series that carry meaning and must meet 3:1 against the panel (grid and band fill are decoration). */
export const MEANINGFUL_SERIES = [
  'spo2',
  'inBand',
  'below',
  'above',
  'untrusted',
  'envelope',
  'bandEdge',
  'hr',
  'fio2',
  'escalation',
  'cursor',
  'axis',
  'extra',
] as const;
