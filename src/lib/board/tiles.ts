/**
 * The ward board's tiles: state, concern and sort order for every bed of a unit, from rows the
 * server has already fetched. Pure — every clinical judgement comes from src/lib/oxygenation.
 */
import { BAND_STATE_WORDS } from '~/lib/oxygenation/band-state.ts';
import {
  bandState,
  detectConcerns,
  news2,
  untrustedReason,
  type BandStateName,
  type News2Response,
  type Reading,
  type ReadingSource,
} from '~/lib/oxygenation/index.ts';
import { escalationSettingsOf } from '~/lib/oxygenation/settings.ts';
import type { OxygenDevice, TraceQuality } from '~/lib/oxygenation/types.ts';
import { news2InputOf, type ChartedObs } from '~/lib/charting/charted-obs.ts';
import { CALIBRATED_FLOOR_PCT } from '~/lib/charting/obs-input.ts';
import { readingsUnderBand } from '~/lib/escalations/judge.ts';
import type { UnitSettings } from '~/lib/units/settings.ts';
import { formatClock, formatMinutes } from '~/lib/time/format.ts';

/** What the board reads of a unit's settings. */
export type BoardSettings = Omit<UnitSettings, 'renotifyMin' | 'outreachEmails'>;

export interface BedInput {
  bedId: number;
  bedLabel: string;
  patient: null | { id: number; label: string; co2RetentionRisk: boolean };
  band: null | { low: number; high: number; news2Scale: 1 | 2; orderedAt: number };
  /** Current readings since (at most) the lookback, oldest first: device, import and charted. */
  readings: Reading[];
  lastCharted: ChartedObs | null;
  escalation: null | {
    id: number;
    kind: string;
    severity: string | null;
    state: 'raised' | 'claimed';
    raisedAt: number;
    claimedBy: string | null;
  };
  nurse: null | { id: number; name: string };
  /** An open occult-hypoxaemia task: a blood gas whose SaO₂ was < 88 % while SpO₂ read ≥ 92 %. */
  occultHypoxaemia?: OccultFlag | null;
}

export interface OccultFlag {
  escalationId: number;
  sampledAt: number;
  sao2: number;
  spo2AtSample: number;
  state: 'raised' | 'claimed';
}

/** Most concerning first; the order the brief gives. */
export const CONCERN_ORDER = [
  'urgent_escalation',
  'below_band',
  'cannot_verify',
  'no_band',
  'overdue',
  'above_on_oxygen',
  'in_band',
  'no_reading',
  'empty',
] as const;
export type ConcernKey = (typeof CONCERN_ORDER)[number];

export interface BoardTile {
  bedId: number;
  bedLabel: string;
  patient: BedInput['patient'];
  band: null | { low: number; high: number; news2Scale: 1 | 2 };
  /**
   * The band state now. With no current reading, `was` is the last state known and `until` the time of
   * the last reading (its duration `wasMin` no longer grows): "was below band until 06:08".
   */
  state: {
    name: BandStateName;
    sinceMin: number | null;
    was: BandStateName | null;
    wasMin: number | null;
    until: number | null;
  };
  /** The newest reading, where it came from, how old it is, and why it is not trusted (null when it is). */
  latest: null | {
    at: number;
    source: ReadingSource;
    ageSec: number;
    spo2: number | null;
    trace: TraceQuality;
    trusted: boolean;
    untrustedReason: string | null;
    heartRate: number | null;
    belowCalibratedRange: boolean;
  };
  /** A bed with monitor readings in the lookback: its newest device reading, and whether it is older than the unit's limit. */
  monitor: null | { lastAt: number; silent: boolean; silentMin: number };
  /** The unit's zone: the tile's words carry clock times in it. */
  timeZone: string;
  oxygen: { fio2: number | null; fio2Estimated: boolean; device: OxygenDevice | null };
  minutesSinceCharted: number | null;
  overdue: boolean;
  news2: null | { total: number; response: News2Response | null; scale: 1 | 2 };
  concerns: {
    belowBand: null | {
      severity: 'standard' | 'urgent';
      sinceMin: number;
      nadir: number;
      runStart: number;
      runEnd: number;
    };
    cannotVerify: null | { sinceMin: number };
    aboveOnOxygen: null | { sinceMin: number };
  };
  escalation: BedInput['escalation'];
  nurse: BedInput['nurse'];
  occultHypoxaemia: OccultFlag | null;
  concern: { key: ConcernKey; rank: number; reason: string };
  /** One sentence for screen readers: the tile said in words. */
  sentence: string;
}

const minutesBetween = (a: number, b: number) => Math.max(0, Math.floor((b - a) / 60_000));

export function buildTile(bed: BedInput, now: number, settings: BoardSettings, timeZone = 'UTC'): BoardTile {
  if (!bed.patient) {
    return {
      bedId: bed.bedId,
      bedLabel: bed.bedLabel,
      patient: null,
      band: null,
      state: { name: 'no_reading', sinceMin: null, was: null, wasMin: null, until: null },
      latest: null,
      monitor: null,
      timeZone,
      oxygen: { fio2: null, fio2Estimated: false, device: null },
      minutesSinceCharted: null,
      overdue: false,
      news2: null,
      concerns: { belowBand: null, cannotVerify: null, aboveOnOxygen: null },
      escalation: null,
      nurse: bed.nurse,
      occultHypoxaemia: null,
      concern: { key: 'empty', rank: CONCERN_ORDER.indexOf('empty'), reason: 'Empty bed' },
      sentence: `Bed ${bed.bedLabel}: empty.`,
    };
  }
  const band = bed.band ? { low: bed.band.low, high: bed.band.high } : null;
  // Judge only readings taken under the band in force now: an older band's readings are not re-judged.
  const readings = readingsUnderBand(bed.readings, bed.band);
  const state = bandState(bed.readings, band, now, { minPerfusionIndexPct: settings.minPerfusionIndexPct });
  const concerns = detectConcerns(readings, band, now, escalationSettingsOf(settings));
  const last = state.latest;
  const lastCharted = bed.lastCharted;
  // With no current reading, what was last known stays said, with the time it ended (its duration stops).
  let was: { name: BandStateName; since: number | null } | null = null;
  if (state.state === 'no_reading' && last && band) {
    const then = bandState(bed.readings, band, last.at, { minPerfusionIndexPct: settings.minPerfusionIndexPct });
    if (then.state !== 'no_reading' && then.state !== 'no_band') was = { name: then.state, since: then.since };
  }
  let lastDevice: Reading | undefined;
  for (const r of bed.readings) if (r.source !== 'charted' && r.at <= now) lastDevice = r;
  const monitor = lastDevice
    ? {
        lastAt: lastDevice.at,
        silent: now - lastDevice.at > settings.monitorSilentMin * 60_000,
        silentMin: settings.monitorSilentMin,
      }
    : null;
  const minutesSinceCharted = lastCharted ? minutesBetween(lastCharted.at, now) : null;
  const overdue = minutesSinceCharted === null || minutesSinceCharted > settings.overdueMin;

  let newsScore: BoardTile['news2'] = null;
  if (lastCharted) {
    const scale = bed.band?.news2Scale ?? 1;
    const n = news2(news2InputOf(lastCharted), scale);
    if (n.complete && n.total !== null) newsScore = { total: n.total, response: n.response, scale };
  }

  const tile: BoardTile = {
    bedId: bed.bedId,
    bedLabel: bed.bedLabel,
    patient: bed.patient,
    band: bed.band ? { ...band!, news2Scale: bed.band.news2Scale } : null,
    state: {
      name: state.state,
      sinceMin: state.sinceMin === null ? null : Math.floor(state.sinceMin),
      was: was?.name ?? null,
      wasMin: was && was.since !== null && last ? Math.floor((last.at - was.since) / 60_000) : null,
      until: was && last ? last.at : null,
    },
    latest: last
      ? {
          at: last.at,
          source: last.source,
          ageSec: Math.max(0, Math.floor((now - last.at) / 1000)),
          spo2: last.spo2,
          trace: last.trace,
          trusted: untrustedReason(last, settings.minPerfusionIndexPct) === null,
          untrustedReason: untrustedReason(last, settings.minPerfusionIndexPct),
          heartRate: last.heartRate ?? null,
          belowCalibratedRange: last.spo2 !== null && last.spo2 < CALIBRATED_FLOOR_PCT,
        }
      : null,
    monitor,
    timeZone,
    oxygen: latestOxygen(bed),
    minutesSinceCharted,
    overdue,
    news2: newsScore,
    concerns: {
      belowBand: concerns.belowBand
        ? {
            severity: concerns.belowBand.severity,
            sinceMin: Math.floor(concerns.belowBand.sinceMin),
            nadir: concerns.belowBand.nadir,
            runStart: concerns.belowBand.runStart,
            runEnd: concerns.belowBand.runEnd,
          }
        : null,
      cannotVerify: concerns.cannotVerify ? { sinceMin: Math.floor(concerns.cannotVerify.sinceMin) } : null,
      aboveOnOxygen: concerns.aboveOnOxygen ? { sinceMin: Math.floor(concerns.aboveOnOxygen.sinceMin) } : null,
    },
    escalation: bed.escalation,
    nurse: bed.nurse,
    occultHypoxaemia: bed.occultHypoxaemia ?? null,
    concern: { key: 'in_band', rank: 0, reason: '' },
    sentence: '',
  };
  tile.concern = concernOf(tile);
  tile.sentence = sentenceFor(tile);
  return tile;
}

function latestOxygen(bed: BedInput): BoardTile['oxygen'] {
  for (let i = bed.readings.length - 1; i >= 0; i--) {
    const r = bed.readings[i]!;
    if (r.fio2 !== null && r.fio2 !== undefined)
      return { fio2: r.fio2, fio2Estimated: Boolean(r.fio2Estimated), device: r.device ?? null };
  }
  if (bed.lastCharted)
    return { fio2: bed.lastCharted.fio2, fio2Estimated: bed.lastCharted.fio2Estimated, device: bed.lastCharted.device };
  return { fio2: null, fio2Estimated: false, device: null };
}

export function stateWords(
  tile: Pick<BoardTile, 'state' | 'band' | 'latest' | 'timeZone'> & { onOxygen?: boolean },
): string {
  const since = tile.state.sinceMin === null ? '' : ` ${formatMinutes(tile.state.sinceMin)}`;
  switch (tile.state.name) {
    case 'below':
    case 'above':
    case 'in':
    case 'untrusted':
      return `${BAND_STATE_WORDS[tile.state.name]}${since}`;
    case 'no_band':
      return BAND_STATE_WORDS.no_band;
    default:
      if (tile.state.was && tile.state.until !== null) {
        return `was ${BAND_STATE_WORDS[tile.state.was]}${tile.state.wasMin ? ` ${formatMinutes(tile.state.wasMin)}` : ''} until ${formatClock(tile.state.until, tile.timeZone)} · no reading since`;
      }
      return 'no reading';
  }
}

/** Where the big number comes from and how old it is: "40 s ago" (monitor), "charted 06:01". */
export function latestWords(tile: Pick<BoardTile, 'latest' | 'timeZone'>): string {
  const l = tile.latest;
  if (!l) return '';
  if (l.source === 'charted') return `charted ${formatClock(l.at, tile.timeZone)}`;
  const from = l.source === 'import' ? 'imported' : 'monitor';
  return l.ageSec < 120
    ? `${from} · ${l.ageSec < 5 ? 'just now' : `${l.ageSec} s ago`}`
    : `${from} · ${formatClock(l.at, tile.timeZone)}`;
}

/** "monitor silent since 06:08" when a monitored bed's newest device reading is older than the unit's limit. */
export function monitorWords(tile: Pick<BoardTile, 'monitor' | 'timeZone'>): string | null {
  return tile.monitor?.silent ? `monitor silent since ${formatClock(tile.monitor.lastAt, tile.timeZone)}` : null;
}

/** Spans of minutes in words come from the one time-formatting module. */
export { formatMinutes };

function concernOf(t: BoardTile): BoardTile['concern'] {
  const rank = (key: ConcernKey) => CONCERN_ORDER.indexOf(key);
  if (t.escalation && t.escalation.kind === 'below_band' && t.escalation.severity === 'urgent') {
    const since = t.concerns.belowBand?.sinceMin ?? (t.state.name === 'below' ? t.state.sinceMin : null);
    const below = since === null ? 'Was below band' : `Below band ${formatMinutes(since)}`;
    return {
      key: 'urgent_escalation',
      rank: rank('urgent_escalation'),
      reason: `${below} — urgent escalation ${t.escalation.state}`,
    };
  }
  if (t.concerns.belowBand || t.state.name === 'below') {
    const urgent = t.concerns.belowBand?.severity === 'urgent' ? ' (urgent)' : '';
    if (t.state.name === 'no_reading' && t.concerns.belowBand) {
      // Silence does not end the concern, but its duration stops where the readings stopped.
      const b = t.concerns.belowBand;
      return {
        key: 'below_band',
        rank: rank('below_band'),
        reason: `Was below band ${formatMinutes((b.runEnd - b.runStart) / 60_000)}${urgent}, until ${formatClock(b.runEnd, t.timeZone)} — no reading since: check the bedside`,
      };
    }
    const since = t.concerns.belowBand?.sinceMin ?? t.state.sinceMin;
    return {
      key: 'below_band',
      rank: rank('below_band'),
      reason: `Below band${since === null ? '' : ` ${formatMinutes(since)}`}${urgent}`,
    };
  }
  if (t.concerns.cannotVerify)
    return {
      key: 'cannot_verify',
      rank: rank('cannot_verify'),
      reason: `Cannot verify: untrusted readings only for ${formatMinutes(t.concerns.cannotVerify.sinceMin)}${t.latest?.untrustedReason ? ` (${t.latest.untrustedReason})` : ''} — check the probe`,
    };
  if (t.escalation?.kind === 'probe_check')
    return {
      key: 'cannot_verify',
      rank: rank('cannot_verify'),
      reason: `Probe check: ${monitorWords(t) ?? 'readings cannot be verified'} — check the probe at the bedside`,
    };
  if (!t.band) return { key: 'no_band', rank: rank('no_band'), reason: 'No band ordered' };
  if (t.overdue)
    return {
      key: 'overdue',
      rank: rank('overdue'),
      reason:
        t.minutesSinceCharted === null
          ? 'No obs charted yet'
          : `Obs overdue: last charted ${formatMinutes(t.minutesSinceCharted)} ago`,
    };
  if (t.concerns.aboveOnOxygen)
    return {
      key: 'above_on_oxygen',
      rank: rank('above_on_oxygen'),
      reason: `Above band on O₂ ${formatMinutes(t.concerns.aboveOnOxygen.sinceMin)} — consider weaning`,
    };
  if (t.state.name === 'no_reading')
    return {
      key: 'no_reading',
      rank: rank('no_reading'),
      reason: monitorWords(t) ? capitalise(monitorWords(t)!) : 'No current reading',
    };
  return {
    key: 'in_band',
    rank: rank('in_band'),
    reason:
      t.state.name === 'above'
        ? 'Above band'
        : t.state.name === 'untrusted'
          ? `Untrusted reading: ${t.latest?.untrustedReason ?? 'poor trace'}`
          : 'In band',
  };
}

function sentenceFor(t: BoardTile): string {
  if (!t.patient) return `Bed ${t.bedLabel}: empty.`;
  const parts = [`Bed ${t.bedLabel}, patient ${t.patient.label}.`];
  parts.push(t.band ? `Band ${t.band.low} to ${t.band.high} percent.` : 'No band ordered.');
  if (t.latest?.spo2 !== null && t.latest?.spo2 !== undefined)
    parts.push(
      `Latest SpO₂ ${t.latest.spo2} percent, ${latestWords(t)}, ${t.latest.trusted ? `${t.latest.trace} trace` : `not trusted: ${t.latest.untrustedReason}`}.`,
    );
  parts.push(`${capitalise(stateWords(t))}.`);
  if (monitorWords(t)) parts.push(`${capitalise(monitorWords(t)!)}.`);
  parts.push(`Concern: ${t.concern.reason}.`);
  if (t.minutesSinceCharted !== null)
    parts.push(`Last obs charted ${formatMinutes(t.minutesSinceCharted)} ago${t.overdue ? ', overdue' : ''}.`);
  if (t.news2) parts.push(`NEWS2 ${t.news2.total}.`);
  if (t.escalation) parts.push(`Escalation ${t.escalation.state}.`);
  if (t.occultHypoxaemia)
    parts.push(
      `Occult hypoxaemia: blood gas SaO₂ ${t.occultHypoxaemia.sao2} percent while SpO₂ read ${t.occultHypoxaemia.spo2AtSample} percent.`,
    );
  return parts.join(' ');
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** Most concerning first; within a concern, the longest-standing first, then bed order. */
export function sortTiles(tiles: BoardTile[]): BoardTile[] {
  return tiles
    .map((t, i) => ({ t, i }))
    .sort(
      (a, b) =>
        a.t.concern.rank - b.t.concern.rank || (b.t.state.sinceMin ?? -1) - (a.t.state.sinceMin ?? -1) || a.i - b.i,
    )
    .map(({ t }) => t);
}
