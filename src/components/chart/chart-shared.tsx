/**
 * Small pieces shared by the bed chart islands: SWR keys for one patient, the revalidation hook
 * every write calls, time formatting in the unit's zone, field-error helpers and the band-state
 * mark (colour is never the only cue: each state has its own shape and word).
 */
import { useCallback, useId } from 'react';
import { useSWRConfig } from 'swr';
import type { OrderView } from '~/lib/charting/api-types.ts';
import { BAND_STATE_WORDS, type BandStateName } from '~/lib/oxygenation/band-state.ts';
import { formatClock as fmtClock, formatDayTime as fmtDayTime } from '~/lib/time/format.ts';

export const POLL_MS = 15_000;
export const OBS_PAGE_SIZE = 20;

/** Every GET key of one patient's bed chart, so a write can refresh the whole page. */
export function chartKeys(patientId: number) {
  const base = `/api/patients/${patientId}`;
  return {
    patient: base,
    targets: `${base}/targets`,
    observations: (page: number, pageSize = OBS_PAGE_SIZE) => `${base}/observations?page=${page}&pageSize=${pageSize}`,
    series: (hours: number) => `${base}/series?hours=${hours}`,
    /** True for any key of this patient (and not of patient 12 when this is patient 1). */
    matches: (key: unknown): boolean =>
      typeof key === 'string' && (key === base || key.startsWith(`${base}/`) || key.startsWith(`${base}?`)),
  };
}

/** Revalidates every cached key of the patient: call after any successful write. */
export function useRefreshChart(patientId: number) {
  const { mutate } = useSWRConfig();
  return useCallback(() => mutate((key) => chartKeys(patientId).matches(key)), [mutate, patientId]);
}

// ── Time in the unit's zone (through the one formatting module) ───────────────────────────────
const zoneOk = new Map<string, boolean>();
function safeZone(timeZone: string): string {
  let ok = zoneOk.get(timeZone);
  if (ok === undefined) {
    try {
      fmtClock(0, timeZone);
      ok = true;
    } catch {
      ok = false; // an unknown zone name must not blank the chart
    }
    zoneOk.set(timeZone, ok);
  }
  return ok ? timeZone : 'UTC';
}
/** "14:05" in the unit's zone. */
export const formatClock = (t: string | number | Date, timeZone: string) => fmtClock(t, safeZone(timeZone));
/** "2 Dec 14:05" in the unit's zone (axis labels of long windows). */
export const formatDayClock = (t: string | number | Date, timeZone: string) => fmtDayTime(t, safeZone(timeZone));
/** "2 Dec 14:05" in the unit's zone. */
export const formatDateTime = (t: string | number | Date, timeZone: string) => fmtDayTime(t, safeZone(timeZone));

/** Where a reading came from, in the chart's words. */
export const SOURCE_WORDS: Record<string, string> = { charted: 'charted', device: 'monitor', import: 'imported' };

// ── Numbers ──────────────────────────────────────────────────────────────────────────────────
export const fmtFio2 = (f: number) => (Math.round(f * 100) / 100).toFixed(2);
export const fmtNum = (v: number | null | undefined, digits = 0) =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : digits === 0 ? String(Math.round(v)) : v.toFixed(digits);

// ── Band state ───────────────────────────────────────────────────────────────────────────────
/** The order in force at `at` (orders newest first, as the API sends them). */
export function orderAt(orders: readonly OrderView[], at: string | number): OrderView | null {
  const t = typeof at === 'number' ? at : Date.parse(at);
  for (const o of orders) if (Date.parse(o.orderedAt) <= t) return o;
  return null;
}

export const bandStateWord = (s: BandStateName) => BAND_STATE_WORDS[s];

const STATE_CLASSES: Record<BandStateName, string> = {
  below: 'text-coral-700 dark:text-coral-300',
  in: 'text-glass-700 dark:text-glass-300',
  above: 'text-iris-700 dark:text-iris-300',
  untrusted: 'text-ink-600 dark:text-ink-300',
  no_band: 'text-ink-600 dark:text-ink-300',
  no_reading: 'text-ink-500 dark:text-ink-400',
};

/** Our own marks: chevron down (below), chevron up (above), dot (in band), hatched ring (untrusted). */
export function StateIcon({ state, className = 'h-3.5 w-3.5' }: { state: BandStateName; className?: string }) {
  const hatchId = `hatch${useId().replace(/[^a-zA-Z0-9_-]/g, '')}`;
  const common = { className, viewBox: '0 0 16 16', focusable: 'false' as const };
  switch (state) {
    case 'below':
      return (
        <svg {...common} aria-hidden="true">
          <path
            d="M3 5.5 8 10.5 13 5.5"
            fill="none"
            stroke="currentColor"
            strokeWidth="2.4"
            strokeLinecap="round"
            strokeLinejoin="round"
          />
        </svg>
      );
    case 'above':
      return (
        <svg {...common} aria-hidden="true">
          <path
            d="M3 10.5 8 5.5 13 10.5"
            fill="none"
            stroke="currentColor"
            strokeWidth="2.4"
            strokeLinecap="round"
            strokeLinejoin="round"
          />
        </svg>
      );
    case 'in':
      return (
        <svg {...common} aria-hidden="true">
          <circle cx="8" cy="8" r="4" fill="currentColor" />
        </svg>
      );
    case 'untrusted':
      return (
        <svg {...common} aria-hidden="true">
          <defs>
            <pattern id={hatchId} width="3" height="3" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
              <line x1="0" y1="0" x2="0" y2="3" stroke="currentColor" strokeWidth="1" />
            </pattern>
          </defs>
          <circle cx="8" cy="8" r="5" fill={`url(#${hatchId})`} stroke="currentColor" strokeWidth="1.6" />
        </svg>
      );
    default:
      return (
        <svg {...common} aria-hidden="true">
          <line x1="4" y1="8" x2="12" y2="8" stroke="currentColor" strokeWidth="2" />
        </svg>
      );
  }
}

/** Mark + word, e.g. "⌄ below band". */
export function StateBadge({ state, className = '' }: { state: BandStateName; className?: string }) {
  return (
    <span
      className={`inline-flex items-center gap-1 font-bold ${STATE_CLASSES[state]} ${className}`}
      data-state={state}
    >
      <StateIcon state={state} />
      <span>{bandStateWord(state)}</span>
    </span>
  );
}
