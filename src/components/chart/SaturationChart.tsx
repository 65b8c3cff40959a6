/**
 * The bed chart: three panels on one time axis, so no line shares a scale with another.
 * - SpO₂ alone against the ordered band (shaded per order segment, so it steps when an order
 *   changes): trusted readings filled (dot in band, down mark below, up mark above), untrusted
 *   hollow rings, charted obs as larger squared marks, min–max envelopes when a point stands for
 *   a bucket of readings, escalation marks, and any extra marks a caller passes (`extraMarks`).
 * - Heart rate in its own panel; the oxygen panel below with FiO₂ as steps labelled with the
 *   device and flow.
 * Hover, or focus the chart and use the arrow keys, to read every value at one time. A text
 * summary says the same for those who cannot see the chart. Times are in the unit's zone.
 *
 * Presentational: the page fetches the series (SWR) and passes it in with the window.
 */
import { useEffect, useMemo, useRef, useState, type KeyboardEvent, type MouseEvent, type ReactNode } from 'react';
import {
  Area,
  ComposedChart,
  Line,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  XAxis,
  YAxis,
  CartesianGrid,
} from 'recharts';
import type { BandSegment, SeriesResponse, Spo2Point } from '~/lib/charting/api-types.ts';
import { valuesAt, type ValuesAt } from '~/lib/charting/chart-values.ts';
import { CALIBRATED_FLOOR_PCT, DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import { formatClock, formatDayTime } from '~/lib/time/format.ts';
import { CHART_COLOURS, type ChartColours } from '~/lib/ui/chart-palette.ts';
import { SOURCE_WORDS, StateBadge, StateIcon, bandStateWord, fmtFio2 } from './chart-shared.tsx';
import { CHART_WINDOW_HOURS, type WindowHours } from '~/lib/charting/api-types.ts';
import { bandStateOf, type BandStateName } from '~/lib/oxygenation/band-state.ts';
import { errorText } from '~/lib/client/use-form.ts';

/** An extra set of marks on the SpO₂ panel (e.g. measured SaO₂ from blood gases). */
export interface ExtraSpo2Mark {
  key: string | number;
  t: number;
  v: number;
  label: string;
  /** When set, the mark is ringed and this word is written beside it (e.g. "occult hypoxaemia"). */
  flag?: string;
}

export interface SaturationChartProps {
  series: SeriesResponse | undefined;
  timeZone: string;
  hours: WindowHours;
  onHoursChange: (hours: WindowHours) => void;
  /** A fetch error (the last good series, if any, is still drawn with a stale notice). */
  error?: unknown;
  /** Fixed pixel size instead of filling the container (tests; print). Height is the SpO₂ panel's. */
  size?: { width: number; height: number };
  /** Extra point marks on the SpO₂ panel, drawn as diamonds, with their name for the legend. */
  extraMarks?: { name: string; marks: ExtraSpo2Mark[] };
}

/** Break lines over gaps longer than this (no reading is not "carried on"). */
const LINE_GAP_MS = 75 * 60_000;
/** Draw a mark per trusted reading only when there are few enough to tell apart. */
const MAX_MARKS = 400;
const TICK_STEP_H: Record<WindowHours, number> = { 6: 1, 12: 2, 24: 4, 72: 12 };
/** Plot margins in px: the pointer → time mapping uses the same numbers. */
const Y_AXIS_W = 44;
const MARGIN = { top: 10, right: 16, bottom: 2, left: 4 };

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

const deviceWords = (d: string | null, flow: number | null) =>
  d
    ? `${DEVICE_LABELS[d as keyof typeof DEVICE_LABELS] ?? d}${flow !== null && d !== 'room_air' ? ` ${flow} L/min` : ''}`
    : '';

/** The sentence the chart says in words (also the screen-reader alternative). */
export function chartSummary(s: SeriesResponse, timeZone: string): string {
  const parts: string[] = [];
  const clock = (t: number) => (s.hours > 24 ? formatDayTime(t, timeZone) : formatClock(t, timeZone));
  parts.push(
    `SpO₂ over the last ${s.hours} h (${clock(s.from)} to ${clock(s.to)}, unit time): ${s.rawCounts.spo2} readings`,
  );
  const latest = s.spo2[s.spo2.length - 1];
  if (latest) {
    const band = bandAt(s.bands, latest.t);
    const state = bandStateOf(latest.v, latest.trusted, band);
    const where =
      state === 'untrusted'
        ? 'untrusted (poor trace)'
        : state === 'no_band'
          ? 'no band ordered'
          : `${bandStateWord(state)} ${band!.low}–${band!.high} %`;
    parts.push(
      `latest ${latest.v} % at ${formatClock(latest.t, timeZone)}, ${where}${latest.v < CALIBRATED_FLOOR_PCT ? ', below the calibrated range of the oximeter' : ''}`,
    );
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
  if (s.escalations.length)
    sentence += ` ${s.escalations.length} escalation${s.escalations.length === 1 ? '' : 's'} in this window.`;
  for (const g of s.bloodGases ?? []) {
    sentence += ` Blood gas at ${formatClock(g.t, timeZone)}: SaO₂ ${g.sao2} %${g.spo2AtSample !== null ? ` while SpO₂ read ${g.spo2AtSample} %` : ''}${g.occult ? ' — occult hypoxaemia' : ''}.`;
  }
  return sentence;
}

/** Every value at one time, in words (the hover / keyboard read-out). */
export function readoutText(v: ValuesAt, timeZone: string): string {
  const parts = [formatDayTime(v.t, timeZone)];
  if (v.spo2) {
    const state = bandStateOf(v.spo2.v, v.spo2.trusted, v.band);
    const range =
      v.spo2.lo !== undefined && v.spo2.hi !== undefined && v.spo2.lo !== v.spo2.hi
        ? ` (${v.spo2.lo}–${v.spo2.hi})`
        : '';
    parts.push(`SpO₂ ${v.spo2.v} %${range} ${bandStateWord(state)}${v.spo2.source === 'charted' ? ', charted' : ''}`);
  } else parts.push('SpO₂ no reading');
  parts.push(v.band ? `band ${v.band.low}–${v.band.high} %` : 'no band');
  parts.push(v.heartRate ? `HR ${Math.round(v.heartRate.v)}/min` : 'HR no reading');
  parts.push(
    v.fio2
      ? `FiO₂ ${fmtFio2(v.fio2.v)}${v.fio2.estimated ? ' (estimated)' : ''}${v.fio2.device ? ` ${deviceWords(v.fio2.device, v.fio2.flowLpm)}` : ''}`
      : 'FiO₂ not charted',
  );
  return parts.join(' · ');
}

interface MarkPoint extends Spo2Point {
  state: BandStateName;
}

/** Night mode is a class on <html>; the chart's SVG colours follow it. */
function useNight(): boolean {
  const [night, setNight] = useState(false);
  useEffect(() => {
    const root = document.documentElement;
    const read = () => setNight(root.classList.contains('night'));
    read();
    const obs = new MutationObserver(read);
    obs.observe(root, { attributes: true, attributeFilter: ['class'] });
    return () => obs.disconnect();
  }, []);
  return night;
}

function ReadingMark(props: { cx?: number; cy?: number; payload?: MarkPoint; colours: ChartColours }) {
  const { cx, cy, payload, colours } = props;
  if (cx === undefined || cy === undefined || !payload) return <g />;
  const charted = payload.source === 'charted';
  const k = charted ? 1.35 : 1;
  switch (payload.state) {
    case 'untrusted':
      return (
        <circle
          cx={cx}
          cy={cy}
          r={4 * k}
          fill="none"
          stroke={colours.untrusted}
          strokeWidth={1.6}
          data-mark="untrusted"
          data-source={payload.source}
        />
      );
    case 'below':
      return (
        <path
          d={`M${cx - 4.5 * k},${cy - 3 * k} L${cx + 4.5 * k},${cy - 3 * k} L${cx},${cy + 4 * k} Z`}
          fill={colours.below}
          stroke={charted ? colours.spo2 : 'none'}
          data-mark="below"
          data-source={payload.source}
        />
      );
    case 'above':
      return (
        <path
          d={`M${cx - 4.5 * k},${cy + 3 * k} L${cx + 4.5 * k},${cy + 3 * k} L${cx},${cy - 4 * k} Z`}
          fill={colours.above}
          stroke={charted ? colours.spo2 : 'none'}
          data-mark="above"
          data-source={payload.source}
        />
      );
    default:
      return charted ? (
        <rect
          x={cx - 4}
          y={cy - 4}
          width={8}
          height={8}
          fill={colours.inBand}
          stroke={colours.spo2}
          data-mark="in"
          data-source="charted"
        />
      ) : (
        <circle cx={cx} cy={cy} r={3.2} fill={colours.inBand} data-mark="in" data-source={payload.source} />
      );
  }
}

function ExtraMark(props: { cx?: number; cy?: number; payload?: ExtraSpo2Mark; colour: string; flagColour: string }) {
  const { cx, cy, payload, colour, flagColour } = props;
  if (cx === undefined || cy === undefined) return <g />;
  const flag = payload?.flag;
  return (
    <g data-mark="extra" data-flag={flag}>
      {flag && <circle cx={cx} cy={cy} r={10} fill="none" stroke={flagColour} strokeWidth={2} />}
      <path
        d={`M${cx},${cy - 6} L${cx + 6},${cy} L${cx},${cy + 6} L${cx - 6},${cy} Z`}
        fill="none"
        stroke={colour}
        strokeWidth={2}
      />
      {flag && (
        <text x={cx + 12} y={cy + 4} fill={flagColour} fontSize={11} fontWeight={700}>
          {flag}
        </text>
      )}
    </g>
  );
}

function Fio2Label(props: {
  cx?: number;
  cy?: number;
  payload?: { v: number; device: string | null; flowLpm: number | null; estimated: boolean; label?: boolean };
  colour: string;
}) {
  const { cx, cy, payload, colour } = props;
  if (cx === undefined || cy === undefined || !payload || payload.label === false) return <g />;
  return (
    <text x={cx + 3} y={cy - 4} fill={colour} fontSize={11} data-fio2-label="">
      {`${fmtFio2(payload.v)}${payload.estimated ? ' est.' : ''}${payload.device ? ` ${deviceWords(payload.device, payload.flowLpm)}` : ''}`}
    </text>
  );
}

export default function SaturationChart({
  series,
  timeZone,
  hours,
  onHoursChange,
  error,
  size,
  extraMarks,
}: SaturationChartProps) {
  const night = useNight();
  const colours = night ? CHART_COLOURS.night : CHART_COLOURS.day;
  const model = useMemo(() => (series ? buildModel(series, extraMarks?.marks) : null), [series, extraMarks]);
  const summary = useMemo(() => (series ? chartSummary(series, timeZone) : ''), [series, timeZone]);
  const [cursor, setCursor] = useState<number | null>(null);
  const plotRef = useRef<HTMLDivElement>(null);
  const loadingOther = series !== undefined && series.hours !== hours;
  // The headline is the newest reading itself, never a per-minute mean or a thinned point.
  const latest = series ? (series.newestReading ?? series.spo2[series.spo2.length - 1]) : undefined;
  const latestState = latest && series ? bandStateOf(latest.v, latest.trusted, bandAt(series.bands, latest.t)) : null;
  const tickFmt = (t: number) => (hours > 24 ? formatDayTime(t, timeZone) : formatClock(t, timeZone));
  const cursorAt = cursor !== null && series && cursor >= series.from && cursor <= series.to ? cursor : null;
  const readout = cursorAt !== null && series ? readoutText(valuesAt(series, cursorAt), timeZone) : null;

  const onMove = (e: MouseEvent<HTMLDivElement>) => {
    if (!series || !plotRef.current) return;
    const rect = plotRef.current.getBoundingClientRect();
    const left = MARGIN.left + Y_AXIS_W;
    const width = rect.width - left - MARGIN.right;
    if (width <= 0) return;
    const f = (e.clientX - rect.left - left) / width;
    const t = series.from + f * (domainEnd - series.from);
    setCursor(f < 0 || t > series.to ? null : t);
  };
  const onKey = (e: KeyboardEvent<HTMLDivElement>) => {
    if (!series) return;
    const step = (series.to - series.from) / (e.shiftKey ? 12 : 120);
    const at = cursorAt ?? series.to;
    let next: number | null = null;
    if (e.key === 'ArrowLeft') next = Math.max(series.from, at - step);
    else if (e.key === 'ArrowRight') next = Math.min(series.to, at + step);
    else if (e.key === 'Home') next = series.from;
    else if (e.key === 'End') next = series.to;
    else if (e.key === 'Escape') {
      setCursor(null);
      return;
    }
    if (next !== null) {
      e.preventDefault();
      setCursor(next);
    }
  };

  // The axis runs a little past now, and the band in force fills it: a band ordered a second ago is
  // a visible step at once, not a sliver that widens over the next minutes.
  const domainEnd = series ? series.to + (series.to - series.from) / 30 : 0;
  const xAxis = (showTicks: boolean) =>
    series && (
      <XAxis
        dataKey="t"
        type="number"
        scale="time"
        domain={[series.from, domainEnd]}
        ticks={timeTicks(series.from, series.to, hours)}
        tickFormatter={tickFmt}
        allowDataOverflow
        hide={!showTicks}
        tick={{ fill: colours.axis, fontSize: 12 }}
        stroke={colours.axis}
        height={showTicks ? 24 : 0}
        interval="preserveStartEnd"
      />
    );
  const cursorLine =
    cursorAt !== null ? (
      <ReferenceLine x={cursorAt} yAxisId="y" stroke={colours.cursor} strokeWidth={1} ifOverflow="hidden" />
    ) : null;
  const escalationLines = (labelled: boolean) =>
    series?.escalations.flatMap((e) => [
      <ReferenceLine
        key={`r${e.id}`}
        yAxisId="y"
        x={e.raisedAt}
        stroke={colours.escalation}
        strokeWidth={2}
        strokeDasharray="4 2"
        ifOverflow="hidden"
        label={labelled ? escalationLabel(e, series) : undefined}
      />,
      e.closedAt !== null ? (
        <ReferenceLine
          key={`c${e.id}`}
          yAxisId="y"
          x={e.closedAt}
          stroke={colours.escalation}
          strokeWidth={1}
          ifOverflow="hidden"
        />
      ) : null,
    ]);
  // A mark in the last third of the window is labelled on its left, a line lower than "now", so
  // on a phone the word is neither cut off at the edge nor written over "now".
  const escalationLabel = (e: { raisedAt: number; severity: string | null }, s: { from: number; to: number }) => {
    const late = (e.raisedAt - s.from) / Math.max(1, s.to - s.from) > 0.66;
    return {
      value: `escalation${e.severity === 'urgent' ? ' (urgent)' : ''}`,
      position: late ? ('insideTopRight' as const) : ('insideTopLeft' as const),
      dy: late ? 14 : 0,
      fill: colours.escalation,
      fontSize: 11,
    };
  };
  const w = size?.width;
  const panel = (height: number, child: ReactNode, testId: string) => (
    <div className="w-full" style={{ height: size ? undefined : height }} data-testid={testId}>
      {size ? (
        child
      ) : (
        <ResponsiveContainer width="100%" height="100%">
          {child as never}
        </ResponsiveContainer>
      )}
    </div>
  );
  const spo2Height = size?.height ?? 260;

  const spo2Panel = model && series && (
    <ComposedChart
      {...(w ? { width: w, height: spo2Height } : {})}
      margin={MARGIN}
      data={model.spo2Line}
      accessibilityLayer={false}
    >
      <CartesianGrid stroke={colours.grid} vertical={false} yAxisId="y" />
      {xAxis(false)}
      <YAxis
        yAxisId="y"
        domain={model.spo2Domain}
        allowDataOverflow
        tick={{ fill: colours.axis, fontSize: 12 }}
        stroke={colours.axis}
        width={Y_AXIS_W}
        tickCount={6}
      />
      {series.bands.map((b) => (
        <ReferenceArea
          key={`${b.from}-${b.low}-${b.high}`}
          yAxisId="y"
          x1={Math.max(b.from, series.from)}
          x2={b.to >= series.to ? domainEnd : b.to}
          y1={b.low}
          y2={b.high}
          fill={colours.bandFill}
          fillOpacity={night ? 0.55 : 0.6}
          stroke={colours.bandEdge}
          strokeWidth={1.5}
          ifOverflow="hidden"
        />
      ))}
      <ReferenceLine
        yAxisId="y"
        x={series.to}
        stroke={colours.axis}
        strokeDasharray="1 3"
        ifOverflow="hidden"
        label={{ value: 'now', position: 'insideTopRight', fill: colours.axis, fontSize: 11 }}
      />
      <ReferenceLine
        yAxisId="y"
        y={CALIBRATED_FLOOR_PCT}
        stroke={colours.untrusted}
        strokeDasharray="2 4"
        ifOverflow="hidden"
      />
      {model.envelope.length > 0 && (
        <Area
          yAxisId="y"
          dataKey="range"
          data={model.envelope}
          type="linear"
          stroke="none"
          fill={colours.envelope}
          fillOpacity={0.35}
          isAnimationActive={false}
          connectNulls={false}
        />
      )}
      <Line
        yAxisId="y"
        dataKey="v"
        data={model.spo2Line}
        type="linear"
        stroke={colours.spo2}
        strokeWidth={2}
        dot={false}
        isAnimationActive={false}
        name="SpO₂"
        connectNulls={false}
      />
      {model.marks.length > 0 && (
        <Scatter
          yAxisId="y"
          dataKey="v"
          data={model.marks}
          shape={(p: unknown) => <ReadingMark {...(p as object)} colours={colours} />}
          isAnimationActive={false}
          name="SpO₂ readings"
        />
      )}
      {extraMarks && extraMarks.marks.length > 0 && (
        <Scatter
          yAxisId="y"
          dataKey="v"
          data={extraMarks.marks}
          shape={(p: unknown) => <ExtraMark {...(p as object)} colour={colours.extra} flagColour={colours.below} />}
          isAnimationActive={false}
          name={extraMarks.name}
        />
      )}
      {escalationLines(true)}
      {cursorLine}
    </ComposedChart>
  );

  // The heart-rate and oxygen panels share the SpO₂ panel's time axis, escalation marks and cursor.
  const lowerPanel = (height: number, data: unknown[], showTicks: boolean, yAxis: ReactNode, lines: ReactNode[]) => (
    <ComposedChart {...(w ? { width: w, height } : {})} margin={MARGIN} data={data} accessibilityLayer={false}>
      <CartesianGrid stroke={colours.grid} vertical={false} yAxisId="y" />
      {xAxis(showTicks)}
      {yAxis}
      {lines}
      {escalationLines(false)}
      {cursorLine}
    </ComposedChart>
  );

  const hrPanel =
    model &&
    series &&
    lowerPanel(
      110,
      model.hr,
      false,
      <YAxis
        yAxisId="y"
        domain={model.hrDomain}
        tick={{ fill: colours.axis, fontSize: 12 }}
        stroke={colours.axis}
        width={Y_AXIS_W}
        tickCount={4}
      />,
      [
        model.hrEnvelope.length > 0 && (
          <Area
            key="envelope"
            yAxisId="y"
            dataKey="range"
            data={model.hrEnvelope}
            type="linear"
            stroke="none"
            fill={colours.hr}
            fillOpacity={0.2}
            isAnimationActive={false}
          />
        ),
        <Line
          key="hr"
          yAxisId="y"
          dataKey="v"
          data={model.hr}
          type="linear"
          stroke={colours.hr}
          strokeWidth={1.5}
          dot={false}
          isAnimationActive={false}
          name="Heart rate"
          connectNulls={false}
        />,
      ],
    );

  const o2Panel =
    model &&
    series &&
    lowerPanel(
      120,
      model.fio2,
      true,
      <YAxis
        yAxisId="y"
        domain={[0.2, 1]}
        ticks={[0.21, 0.4, 0.6, 0.8, 1]}
        tickFormatter={(v: number) => v.toFixed(2)}
        tick={{ fill: colours.axis, fontSize: 12 }}
        stroke={colours.axis}
        width={Y_AXIS_W}
      />,
      [
        <Line
          key="fio2"
          yAxisId="y"
          dataKey="v"
          data={model.fio2}
          type="stepAfter"
          stroke={colours.fio2}
          strokeWidth={2}
          dot={false}
          isAnimationActive={false}
          name="FiO₂"
        />,
        <Scatter
          key="labels"
          yAxisId="y"
          dataKey="v"
          data={model.fio2Labels}
          shape={(p: unknown) => <Fio2Label {...(p as object)} colour={colours.fio2} />}
          isAnimationActive={false}
          name="FiO₂ changes"
        />,
      ],
    );

  return (
    <section aria-labelledby="sat-chart-title" data-testid="saturation-chart">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <div className="flex flex-wrap items-baseline gap-3">
          <h2 id="sat-chart-title" className="text-lg font-bold">
            SpO₂ and band
          </h2>
          {latest && latestState && (
            <p className="flex items-baseline gap-2" data-testid="latest-spo2">
              <span className="text-3xl font-bold">{latest.v} %</span>
              <StateBadge state={latestState} />
              <span className="text-sm text-ink-600 dark:text-ink-300">
                {SOURCE_WORDS[latest.source] ?? latest.source} at {formatClock(latest.t, timeZone)}
              </span>
            </p>
          )}
        </div>
        <div role="group" aria-label="Chart window" className="flex gap-1 print:hidden">
          {CHART_WINDOW_HOURS.map((h) => (
            <button
              key={h}
              type="button"
              className={h === hours ? 'btn-primary' : 'btn-quiet'}
              aria-pressed={h === hours}
              onClick={() => onHoursChange(h)}
            >
              {h} h
            </button>
          ))}
        </div>
      </div>

      {error != null && (
        <p
          role="alert"
          className="mb-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200"
        >
          {series
            ? `Could not refresh the chart — showing data from ${formatClock(series.generatedAt, timeZone)} (${errorText(error)})`
            : `Could not load the chart: ${errorText(error)}`}
        </p>
      )}
      {!series && error == null && <p className="py-10 text-center text-ink-600 dark:text-ink-300">Loading chart…</p>}
      {loadingOther && (
        <p className="text-sm text-ink-600 dark:text-ink-300" aria-live="polite">
          Loading the {hours} h window…
        </p>
      )}

      {series && (
        <figure aria-describedby="sat-chart-summary" className="text-ink-700 dark:text-ink-200">
          <p className="min-h-[1.25rem] text-sm font-bold print:hidden" aria-live="polite" data-testid="chart-readout">
            {readout ?? (
              <span className="font-normal text-ink-600 dark:text-ink-300">
                Point at the chart, or focus it and use ← →, to read every value at one time.
              </span>
            )}
          </p>
          <div
            ref={plotRef}
            // biome-ignore lint/a11y/noNoninteractiveTabindex: the plot takes arrow keys to move its time cursor
            tabIndex={0}
            role="group"
            aria-label="Bed chart: left and right arrow keys move the time cursor, Home and End jump to the ends, Escape clears it"
            className="rounded-md focus-visible:outline focus-visible:outline-2 focus-visible:outline-glass-500"
            onMouseMove={onMove}
            onMouseLeave={() => setCursor(null)}
            onKeyDown={onKey}
            data-testid="chart-area"
          >
            <div aria-hidden="true">
              <p className="text-xs font-bold">SpO₂ %</p>
              {panel(spo2Height, spo2Panel, 'panel-spo2')}
              <p className="text-xs font-bold">Heart rate /min</p>
              {panel(110, hrPanel, 'panel-hr')}
              <p className="text-xs font-bold">Oxygen: FiO₂ with device and flow</p>
              {panel(120, o2Panel, 'panel-o2')}
            </div>
          </div>
          <figcaption className="mt-1 flex flex-wrap items-center gap-x-4 gap-y-1 text-xs">
            <span className="inline-flex items-center gap-1">
              <span
                className="inline-block h-3 w-5 rounded-sm border border-glass-600 bg-glass-200 dark:border-glass-400 dark:bg-glass-800"
                aria-hidden="true"
              />{' '}
              band ordered
            </span>
            <span className="inline-flex items-center gap-1 text-glass-700 dark:text-glass-300">
              <StateIcon state="in" /> in band
            </span>
            <span className="inline-flex items-center gap-1 text-coral-700 dark:text-coral-300">
              <StateIcon state="below" /> below band
            </span>
            <span className="inline-flex items-center gap-1 text-iris-700 dark:text-iris-300">
              <StateIcon state="above" /> above band
            </span>
            <span className="inline-flex items-center gap-1">
              <svg viewBox="0 0 16 16" className="h-3.5 w-3.5" aria-hidden="true">
                <circle cx="8" cy="8" r="5" fill="none" stroke="currentColor" strokeWidth="1.6" />
              </svg>{' '}
              untrusted (hollow)
            </span>
            <span className="inline-flex items-center gap-1">
              <svg viewBox="0 0 16 16" className="h-3.5 w-3.5" aria-hidden="true">
                <rect x="3" y="3" width="10" height="10" fill="none" stroke="currentColor" strokeWidth="1.6" />
              </svg>{' '}
              charted obs (larger, outlined)
            </span>
            {model && model.envelope.length > 0 && (
              <span className="inline-flex items-center gap-1">
                <span className="inline-block h-3 w-5 bg-ink-400/40" aria-hidden="true" /> lowest to highest reading in
                each {Math.round(series.bucketMs / 60_000)} min
              </span>
            )}
            {extraMarks && extraMarks.marks.length > 0 && (
              <span className="inline-flex items-center gap-1">
                <span aria-hidden="true">◇</span> {extraMarks.name}
                {[...new Set(extraMarks.marks.map((m) => m.flag).filter(Boolean))]
                  .map((f) => ` (ringed: ${f})`)
                  .join('')}
              </span>
            )}
            {series.escalations.length > 0 && (
              <span className="inline-flex items-center gap-1 text-coral-700 dark:text-coral-300">
                <span aria-hidden="true">┆</span> escalation
              </span>
            )}
          </figcaption>
          <p className="mt-1 text-xs text-ink-600 dark:text-ink-300" data-testid="reading-counts">
            {series.spo2.length} readings shown of {series.rawCounts.spo2}
            {series.spo2.length < series.rawCounts.spo2 ? ' (thinned for the chart; figures use every reading)' : ''}
            {' · '}heart rate {series.heartRate.length} shown of {series.rawCounts.heartRate}
            {' · '}times in the unit’s zone ({timeZone})
          </p>
          <p id="sat-chart-summary" className="sr-only" data-testid="chart-summary">
            {summary}
          </p>
        </figure>
      )}
    </section>
  );
}

function buildModel(s: SeriesResponse, extra?: readonly ExtraSpo2Mark[]) {
  const trusted = s.spo2.filter((p) => p.trusted);
  const spo2Line = breakGaps(trusted);
  const withState = (p: Spo2Point): MarkPoint => ({ ...p, state: bandStateOf(p.v, p.trusted, bandAt(s.bands, p.t)) });
  // Untrusted readings always get their hollow ring and charted obs always their mark; dense
  // monitor readings only when few enough to see.
  const marks =
    trusted.length <= MAX_MARKS
      ? s.spo2.map(withState)
      : s.spo2.filter((p) => !p.trusted || p.source === 'charted').map(withState);
  const envelope = trusted
    .filter((p) => p.lo !== undefined && p.hi !== undefined && p.source !== 'charted')
    .map((p) => ({ t: p.t, range: [p.lo!, p.hi!] as [number, number] }));
  const hr = breakGaps(s.heartRate);
  const hrEnvelope = s.heartRate
    .filter((p) => p.lo !== undefined && p.hi !== undefined)
    .map((p) => ({ t: p.t, range: [p.lo!, p.hi!] as [number, number] }));
  const lastF = s.fio2[s.fio2.length - 1];
  const fio2 = lastF && lastF.t < s.to ? [...s.fio2, { ...lastF, t: s.to }] : s.fio2;
  // Label each change, but not two within a twentieth of the window of each other (they would overlap).
  const minGap = (s.to - s.from) / 20;
  let lastLabel = -Infinity;
  const fio2Labels = s.fio2.map((f) => {
    const label = f.t - lastLabel >= minGap;
    if (label) lastLabel = f.t;
    return { ...f, label };
  });
  const lows = [...s.spo2.map((p) => p.lo ?? p.v), ...s.bands.map((b) => b.low), ...(extra ?? []).map((m) => m.v)];
  const floor = lows.length ? Math.min(...lows) : 85;
  const spo2Domain: [number, number] = [Math.max(0, Math.min(85, Math.floor((floor - 3) / 5) * 5)), 100];
  const hrs = s.heartRate.flatMap((p) => [p.lo ?? p.v, p.hi ?? p.v]);
  const hrDomain: [number, number] = hrs.length
    ? [
        Math.max(0, Math.min(40, Math.floor((Math.min(...hrs) - 10) / 10) * 10)),
        Math.max(160, Math.ceil((Math.max(...hrs) + 10) / 10) * 10),
      ]
    : [40, 160];
  return { spo2Line, marks, envelope, hr, hrEnvelope, fio2, fio2Labels, spo2Domain, hrDomain };
}

function breakGaps(points: readonly { t: number; v: number }[]) {
  const out: { t: number; v: number | null }[] = [];
  for (let i = 0; i < points.length; i++) {
    const p = points[i]!;
    const prev = points[i - 1];
    if (prev && p.t - prev.t > LINE_GAP_MS) out.push({ t: prev.t + 1, v: null });
    out.push({ t: p.t, v: p.v });
  }
  return out;
}
