/**
 * SpO₂ against the ordered band. The band is shaded per order segment, so it steps when an order
 * changes; heart rate has its own right-hand axis; FiO₂ is a step line on its own 0.21–1.0 axis.
 * Trusted readings are filled marks (a dot in band, a down-pointing mark below, an up-pointing
 * mark above); untrusted readings are hollow rings. Escalations are vertical marks. Times on the
 * axis are in the unit's zone. A text summary says the same for those who cannot see the chart.
 *
 * Presentational: the page fetches the series (SWR) and passes it in with the window.
 */
import { useMemo } from 'react';
import { ComposedChart, Line, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, XAxis, YAxis, CartesianGrid } from 'recharts';
import type { BandSegment, SeriesPoint, SeriesResponse, Spo2Point } from '~/lib/charting/api-types.ts';
import { CALIBRATED_FLOOR_PCT } from '~/lib/charting/obs-input.ts';
import {
  StateBadge,
  StateIcon,
  WINDOW_HOURS,
  bandStateOf,
  bandStateWord,
  errorText,
  fmtFio2,
  formatClock,
  formatDayClock,
  type BandState,
  type WindowHours,
} from './chart-shared.tsx';

export interface SaturationChartProps {
  series: SeriesResponse | undefined;
  timeZone: string;
  hours: WindowHours;
  onHoursChange: (hours: WindowHours) => void;
  /** A fetch error (the last good series, if any, is still drawn with a stale notice). */
  error?: unknown;
  /** Fixed pixel size instead of filling the container (tests; print). */
  size?: { width: number; height: number };
}

const COLOURS = {
  band: '#55b8a3', // glass-400
  spo2: '#1b2a41', // ink-800
  below: '#c73f27', // coral-600
  above: '#6f3cd8', // iris-600
  inBand: '#2e7d6e', // glass-600
  untrusted: '#46628a', // ink-500
  hr: '#97aac6', // ink-300
  fio2: '#a3321f', // coral-700
  escalation: '#e8553a', // coral-500
  sao2: '#0e1726', // ink-950: a measured value, drawn as a diamond
};
/** Break the SpO₂ line over gaps longer than this (no reading is not "carried on"). */
const LINE_GAP_MS = 75 * 60_000;
/** Draw a mark per trusted reading only when there are few enough to tell apart. */
const MAX_MARKS = 400;
const TICK_STEP_H: Record<WindowHours, number> = { 6: 1, 12: 2, 24: 4, 72: 12 };

export function bandAt(bands: readonly BandSegment[], t: number): BandSegment | null {
  for (const b of bands) if (t >= b.from && t < b.to) return b;
  const last = bands[bands.length - 1];
  return last && t === last.to ? last : null;
}

export function timeTicks(from: number, to: number, hours: WindowHours): number[] {
  const step = TICK_STEP_H[hours] * 3_600_000;
  const ticks: number[] = [];
  for (let t = Math.ceil(from / step) * step; t <= to; t += step) ticks.push(t);
  return ticks;
}

/** The sentence the chart says in words (also the screen-reader alternative). */
export function chartSummary(s: SeriesResponse, timeZone: string): string {
  const parts: string[] = [];
  const clock = (t: number) => (s.hours > 24 ? formatDayClock(t, timeZone) : formatClock(t, timeZone));
  parts.push(`SpO₂ over the last ${s.hours} h (${clock(s.from)} to ${clock(s.to)}, unit time): ${s.rawCounts.spo2} readings`);
  const latest = s.spo2[s.spo2.length - 1];
  if (latest) {
    const band = bandAt(s.bands, latest.t);
    const state = bandStateOf(latest.v, latest.trusted, band);
    const where = state === 'untrusted' ? 'untrusted (poor trace)' : state === 'no_band' ? 'no band ordered' : `${bandStateWord(state)} ${band!.low}–${band!.high} %`;
    parts.push(`latest ${latest.v} % at ${formatClock(latest.t, timeZone)}, ${where}${latest.v < CALIBRATED_FLOOR_PCT ? ', below the calibrated range of the oximeter' : ''}`);
  } else {
    parts.push('no SpO₂ reading in this window');
  }
  let sentence = `${parts.join('; ')}.`;
  const c = s.derived.compliance;
  const inBand = c.inBandPct === null ? 'Time in band cannot be judged' : `Time in band ${Math.round(c.inBandPct)} %`;
  sentence += ` ${inBand}; ${Math.round(c.belowMin)} min below band, ${Math.round(c.aboveMin)} min above; ${c.untrustedReadings} untrusted readings.`;
  const hr = s.heartRate[s.heartRate.length - 1];
  if (hr) sentence += ` Heart rate latest ${Math.round(hr.v)}/min.`;
  const f = s.fio2[s.fio2.length - 1];
  if (f) sentence += ` FiO₂ latest ${fmtFio2(f.v)}.`;
  const bandChanges = Math.max(0, s.bands.length - 1);
  if (bandChanges) sentence += ` The band changed ${bandChanges === 1 ? 'once' : `${bandChanges} times`}.`;
  if (s.escalations.length) sentence += ` ${s.escalations.length} escalation${s.escalations.length === 1 ? '' : 's'} in this window.`;
  for (const g of s.bloodGases ?? []) {
    sentence += ` Blood gas at ${formatClock(g.t, timeZone)}: SaO₂ ${g.sao2} %${g.spo2AtSample !== null ? ` while SpO₂ read ${g.spo2AtSample} %` : ''}${g.occult ? ' — occult hypoxaemia' : ''}.`;
  }
  return sentence;
}

interface MarkPoint extends Spo2Point { state: BandState }

/** A blood gas's measured SaO₂: a diamond (ringed and labelled when the pair shows occult hypoxaemia). */
function Sao2Mark(props: { cx?: number; cy?: number; payload?: { occult: boolean } }) {
  const { cx, cy, payload } = props;
  if (cx === undefined || cy === undefined || !payload) return <g />;
  const d = `M${cx},${cy - 6} L${cx + 6},${cy} L${cx},${cy + 6} L${cx - 6},${cy} Z`;
  return (
    <g data-mark={payload.occult ? 'sao2-occult' : 'sao2'}>
      {payload.occult && <circle cx={cx} cy={cy} r={10} fill="none" stroke={COLOURS.below} strokeWidth={2} />}
      <path d={d} fill={COLOURS.sao2} stroke="#ffffff" strokeWidth={1} />
      {payload.occult && <text x={cx + 12} y={cy + 4} fill={COLOURS.below} fontSize={11} fontWeight={700}>occult hypoxaemia</text>}
    </g>
  );
}

/** A mark per reading: filled dot / down mark / up mark for trusted, hollow ring for untrusted. */
function ReadingMark(props: { cx?: number; cy?: number; payload?: MarkPoint }) {
  const { cx, cy, payload } = props;
  if (cx === undefined || cy === undefined || !payload) return <g />;
  switch (payload.state) {
    case 'untrusted':
      return <circle cx={cx} cy={cy} r={4} fill="none" stroke={COLOURS.untrusted} strokeWidth={1.6} data-mark="untrusted" />;
    case 'below':
      return <path d={`M${cx - 4.5},${cy - 3} L${cx + 4.5},${cy - 3} L${cx},${cy + 4} Z`} fill={COLOURS.below} data-mark="below" />;
    case 'above':
      return <path d={`M${cx - 4.5},${cy + 3} L${cx + 4.5},${cy + 3} L${cx},${cy - 4} Z`} fill={COLOURS.above} data-mark="above" />;
    default:
      return <circle cx={cx} cy={cy} r={3.2} fill={COLOURS.inBand} data-mark="in" />;
  }
}

export default function SaturationChart({ series, timeZone, hours, onHoursChange, error, size }: SaturationChartProps) {
  const model = useMemo(() => (series ? buildModel(series) : null), [series]);
  const summary = useMemo(() => (series ? chartSummary(series, timeZone) : ''), [series, timeZone]);
  const loadingOther = series !== undefined && series.hours !== hours;
  const latest = series?.spo2[series.spo2.length - 1];
  const latestState = latest && series ? bandStateOf(latest.v, latest.trusted, bandAt(series.bands, latest.t)) : null;
  const tickFmt = (t: number) => (hours > 24 ? formatDayClock(t, timeZone) : formatClock(t, timeZone));

  const chart = model && series && (
    <ComposedChart
      {...(size ?? {})}
      margin={{ top: 8, right: 8, bottom: 4, left: 0 }}
      data={model.fio2}
      accessibilityLayer={false}
    >
      <CartesianGrid stroke="#c3cfe0" strokeOpacity={0.5} vertical={false} yAxisId="spo2" />
      <XAxis
        dataKey="t"
        type="number"
        scale="time"
        domain={[series.from, series.to]}
        ticks={timeTicks(series.from, series.to, hours)}
        tickFormatter={tickFmt}
        allowDataOverflow
        tick={{ fill: 'currentColor', fontSize: 12 }}
      />
      <YAxis yAxisId="spo2" domain={model.spo2Domain} allowDataOverflow tick={{ fill: 'currentColor', fontSize: 12 }} width={40} label={{ value: 'SpO₂ %', angle: -90, position: 'insideLeft', fill: 'currentColor', fontSize: 12 }} />
      <YAxis yAxisId="hr" orientation="right" domain={model.hrDomain} tick={{ fill: COLOURS.hr, fontSize: 12 }} width={36} label={{ value: 'HR /min', angle: 90, position: 'insideRight', fill: COLOURS.hr, fontSize: 12 }} />
      <YAxis yAxisId="fio2" orientation="right" domain={[0.21, 1]} ticks={[0.21, 0.4, 0.6, 0.8, 1]} tickFormatter={(v: number) => v.toFixed(2)} tick={{ fill: COLOURS.fio2, fontSize: 12 }} width={40} label={{ value: 'FiO₂', angle: 90, position: 'insideRight', fill: COLOURS.fio2, fontSize: 12 }} />
      {series.bands.map((b) => (
        <ReferenceArea
          key={`${b.from}-${b.low}-${b.high}`}
          yAxisId="spo2"
          x1={Math.max(b.from, series.from)}
          x2={Math.min(b.to, series.to)}
          y1={b.low}
          y2={b.high}
          fill={COLOURS.band}
          fillOpacity={0.28}
          stroke={COLOURS.band}
          strokeOpacity={0.8}
          ifOverflow="hidden"
        />
      ))}
      <ReferenceLine yAxisId="spo2" y={CALIBRATED_FLOOR_PCT} stroke="#6580a6" strokeDasharray="2 4" ifOverflow="hidden" />
      <Line yAxisId="fio2" dataKey="v" data={model.fio2} type="stepAfter" stroke={COLOURS.fio2} strokeWidth={1.5} strokeDasharray="6 3" dot={false} isAnimationActive={false} name="FiO₂" />
      <Line yAxisId="hr" dataKey="v" data={model.hr} type="monotone" stroke={COLOURS.hr} strokeWidth={1.2} dot={false} isAnimationActive={false} name="Heart rate" connectNulls={false} />
      <Line yAxisId="spo2" dataKey="v" data={model.spo2Line} type="linear" stroke={COLOURS.spo2} className="dark:stroke-ink-100" strokeWidth={1.6} dot={false} isAnimationActive={false} name="SpO₂" connectNulls={false} />
      {model.marks.length > 0 && (
        <Scatter yAxisId="spo2" dataKey="v" data={model.marks} shape={(p: unknown) => <ReadingMark {...(p as object)} />} isAnimationActive={false} name="SpO₂ readings" />
      )}
      {model.gases.length > 0 && (
        <Scatter yAxisId="spo2" dataKey="v" data={model.gases} shape={(p: unknown) => <Sao2Mark {...(p as object)} />} isAnimationActive={false} name="SaO₂ (blood gas)" />
      )}
      {series.escalations.flatMap((e) => [
        <ReferenceLine key={`r${e.id}`} yAxisId="spo2" x={e.raisedAt} stroke={COLOURS.escalation} strokeWidth={2} strokeDasharray="4 2" ifOverflow="hidden"
          label={{ value: `▼ escalation${e.severity === 'urgent' ? ' (urgent)' : ''}`, position: 'insideTopLeft', fill: COLOURS.escalation, fontSize: 11 }} />,
        e.closedAt !== null ? (
          <ReferenceLine key={`c${e.id}`} yAxisId="spo2" x={e.closedAt} stroke={COLOURS.escalation} strokeWidth={1} ifOverflow="hidden"
            label={{ value: 'closed', position: 'insideTopRight', fill: COLOURS.escalation, fontSize: 11 }} />
        ) : null,
      ])}
    </ComposedChart>
  );

  return (
    <section aria-labelledby="sat-chart-title" data-testid="saturation-chart">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <div className="flex flex-wrap items-baseline gap-3">
          <h2 id="sat-chart-title" className="text-lg font-bold">SpO₂ and band</h2>
          {latest && latestState && (
            <p className="flex items-baseline gap-2" data-testid="latest-spo2">
              <span className="text-3xl font-bold">{latest.v} %</span>
              <StateBadge state={latestState} />
              <span className="text-sm text-ink-500 dark:text-ink-400">at {formatClock(latest.t, timeZone)}</span>
            </p>
          )}
        </div>
        <div role="group" aria-label="Chart window" className="flex gap-1">
          {WINDOW_HOURS.map((h) => (
            <button key={h} type="button" className={h === hours ? 'btn-primary' : 'btn-quiet'} aria-pressed={h === hours} onClick={() => onHoursChange(h)}>
              {h} h
            </button>
          ))}
        </div>
      </div>

      {error != null && (
        <p role="alert" className="mb-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200">
          {series
            ? `Could not refresh the chart — showing data from ${formatClock(series.generatedAt, timeZone)} (${errorText(error)})`
            : `Could not load the chart: ${errorText(error)}`}
        </p>
      )}
      {!series && error == null && <p className="py-10 text-center text-ink-500">Loading chart…</p>}
      {loadingOther && <p className="text-sm text-ink-500" aria-live="polite">Loading the {hours} h window…</p>}

      {series && (
        <figure aria-describedby="sat-chart-summary" className="text-ink-700 dark:text-ink-200">
          <div aria-hidden="true" className="h-72 w-full sm:h-80" data-testid="chart-area">
            {size ? chart : <ResponsiveContainer width="100%" height="100%">{chart}</ResponsiveContainer>}
          </div>
          <figcaption className="mt-1 flex flex-wrap items-center gap-x-4 gap-y-1 text-xs">
            <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-5 rounded-sm border border-glass-500 bg-glass-300/50" aria-hidden="true" /> band ordered</span>
            <span className="inline-flex items-center gap-1 text-glass-700 dark:text-glass-300"><StateIcon state="in" /> in band</span>
            <span className="inline-flex items-center gap-1 text-coral-700 dark:text-coral-300"><StateIcon state="below" /> below band</span>
            <span className="inline-flex items-center gap-1 text-iris-700 dark:text-iris-300"><StateIcon state="above" /> above band</span>
            <span className="inline-flex items-center gap-1"><svg viewBox="0 0 16 16" className="h-3.5 w-3.5" aria-hidden="true"><circle cx="8" cy="8" r="5" fill="none" stroke="currentColor" strokeWidth="1.6" /></svg> untrusted (hollow)</span>
            <span className="inline-flex items-center gap-1"><span className="inline-block h-0.5 w-5 bg-ink-300" aria-hidden="true" /> heart rate (right axis)</span>
            <span className="inline-flex items-center gap-1"><span className="inline-block w-5 border-t-2 border-dashed border-coral-700" aria-hidden="true" /> FiO₂ (right axis, 0.21–1.0)</span>
            {model && model.gases.length > 0 && <span className="inline-flex items-center gap-1"><svg viewBox="0 0 16 16" className="h-3.5 w-3.5" aria-hidden="true"><path d="M8 2l6 6-6 6-6-6z" fill="currentColor" /></svg> SaO₂ from a blood gas{model.gases.some((g) => g.occult) ? ' (ringed: occult hypoxaemia)' : ''}</span>}
            {series.escalations.length > 0 && <span className="inline-flex items-center gap-1 text-coral-700 dark:text-coral-300"><span aria-hidden="true">┆</span> escalation</span>}
          </figcaption>
          <p className="mt-1 text-xs text-ink-500 dark:text-ink-400" data-testid="reading-counts">
            {series.spo2.length} readings shown of {series.rawCounts.spo2}
            {series.spo2.length < series.rawCounts.spo2 ? ' (thinned for the chart; figures use every reading)' : ''}
            {' · '}heart rate {series.heartRate.length} shown of {series.rawCounts.heartRate}
            {' · '}times in the unit’s zone ({timeZone})
          </p>
          <p id="sat-chart-summary" className="sr-only" data-testid="chart-summary">{summary}</p>
        </figure>
      )}
    </section>
  );
}

function buildModel(s: SeriesResponse) {
  const trusted = s.spo2.filter((p) => p.trusted);
  const spo2Line: { t: number; v: number | null }[] = [];
  for (let i = 0; i < trusted.length; i++) {
    const p = trusted[i]!;
    const prev = trusted[i - 1];
    if (prev && p.t - prev.t > LINE_GAP_MS) spo2Line.push({ t: prev.t + 1, v: null });
    spo2Line.push({ t: p.t, v: p.v });
  }
  const withState = (p: Spo2Point): MarkPoint => ({ ...p, state: bandStateOf(p.v, p.trusted, bandAt(s.bands, p.t)) });
  // Untrusted readings always get their hollow ring and charted obs always their mark; dense
  // monitor readings only when few enough to see.
  const marks = trusted.length <= MAX_MARKS ? s.spo2.map(withState) : s.spo2.filter((p) => !p.trusted || p.source === 'charted').map(withState);
  const hr: { t: number; v: number | null }[] = breakGaps(s.heartRate);
  const lastF = s.fio2[s.fio2.length - 1];
  const fio2 = lastF && lastF.t < s.to ? [...s.fio2, { t: s.to, v: lastF.v }] : s.fio2;
  const gases = (s.bloodGases ?? []).filter((g) => g.sampleType === 'arterial').map((g) => ({ t: g.t, v: g.sao2, occult: g.occult }));
  const lows = [...s.spo2.map((p) => p.v), ...s.bands.map((b) => b.low), ...gases.map((g) => g.v)];
  const floor = lows.length ? Math.min(...lows) : 85;
  const spo2Domain: [number, number] = [Math.max(0, Math.min(85, Math.floor((floor - 3) / 5) * 5)), 100];
  const hrs = s.heartRate.map((p) => p.v);
  const hrDomain: [number, number] = hrs.length
    ? [Math.max(0, Math.min(40, Math.floor((Math.min(...hrs) - 10) / 10) * 10)), Math.max(160, Math.ceil((Math.max(...hrs) + 10) / 10) * 10)]
    : [40, 160];
  return { spo2Line, marks, hr, fio2, spo2Domain, hrDomain, gases };
}

function breakGaps(points: readonly SeriesPoint[]) {
  const out: { t: number; v: number | null }[] = [];
  for (let i = 0; i < points.length; i++) {
    const p = points[i]!;
    const prev = points[i - 1];
    if (prev && p.t - prev.t > LINE_GAP_MS) out.push({ t: prev.t + 1, v: null });
    out.push({ t: p.t, v: p.v });
  }
  return out;
}
