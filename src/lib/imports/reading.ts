/**
 * One device or trend-file reading: the limits and words shared by the bedside-monitor feed
 * (POST /api/ingest) and the trend-file upload, so both refuse the same things the same way.
 */
import { z } from 'zod';
import { isRealIsoDateTime } from '~/lib/time/iso.ts';
import { TRACE_QUALITIES, type TraceQuality } from '~/lib/oxygenation/types.ts';

/** Plausibility limits: the same as charted obs for SpO₂ and heart rate (deliberately wide). */
export const READING_LIMITS = {
  spo2: { min: 20, max: 100 },
  heartRate: { min: 20, max: 300 },
  perfusionIndex: { min: 0, max: 30 },
} as const;

/** Readings per request of the feed: an hour of one-per-second readings. */
export const MAX_INGEST_BATCH = 3600;
/** The feed takes readings up to this old (a gateway catching up after an outage); older go through a trend file. */
export const INGEST_MAX_AGE_MS = 24 * 3_600_000;
/** Clocks of gateways and the server may disagree a little. */
export const INGEST_FUTURE_SLACK_MS = 2 * 60_000;

export interface DeviceReading {
  at: Date;
  spo2: number | null;
  heartRate: number | null;
  perfusionIndex: number | null;
  trace: TraceQuality;
}

/** No trace word given: a reading with SpO₂ is taken as clean, one without as absent. */
export function defaultTrace(spo2: number | null): TraceQuality {
  return spo2 === null ? 'absent' : 'clean';
}

const L = READING_LIMITS;
const whole = (label: string, lim: { min: number; max: number }, unit: string) =>
  z
    .number({ invalid_type_error: `${label} must be a number` })
    .int(`${label} must be a whole number`)
    .min(lim.min, `${label} under ${lim.min}${unit} is not plausible`)
    .max(lim.max, `${label} over ${lim.max}${unit} is not plausible`)
    .nullable()
    .optional();

/** ISO 8601 date-time with Z or an offset; compiled once (zod's own datetime check rebuilds its pattern per value). */
const ISO_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:?\d{2})$/i;

export const deviceReadingSchema = z
  .object({
    at: z
      .string({ required_error: 'Time is required', invalid_type_error: 'Time must be an ISO 8601 string' })
      .regex(ISO_WITH_OFFSET, 'Time must be ISO 8601 with Z or an offset, e.g. 2026-12-02T10:15:00Z'),
    spo2: whole('SpO₂', L.spo2, ' %'),
    heartRate: whole('Heart rate', L.heartRate, '/min'),
    perfusionIndex: z
      .number({ invalid_type_error: 'Perfusion index must be a number' })
      .min(L.perfusionIndex.min, 'Perfusion index cannot be negative')
      .max(L.perfusionIndex.max, `Perfusion index over ${L.perfusionIndex.max} % is not plausible`)
      .nullable()
      .optional(),
    trace: z
      .enum(TRACE_QUALITIES as [TraceQuality, ...TraceQuality[]], {
        errorMap: () => ({ message: 'Trace must be clean, weak, noisy or absent' }),
      })
      .optional(),
  })
  .strict('Unknown field in a reading');

/**
 * The feed's body. Reading errors are named by index, e.g. `readings.12.spo2`. The rules across
 * fields and against the clock run once over the array (one pass, not one refinement per reading:
 * a batch of 3,600 is validated in a few milliseconds).
 */
export function ingestBatchSchema(now: Date) {
  const latest = now.getTime() + INGEST_FUTURE_SLACK_MS;
  const earliest = now.getTime() - INGEST_MAX_AGE_MS;
  return z
    .object({
      readings: z
        .array(deviceReadingSchema, {
          required_error: 'readings is required',
          invalid_type_error: 'readings must be an array',
        })
        .min(1, 'Send at least one reading')
        .max(MAX_INGEST_BATCH, `At most ${MAX_INGEST_BATCH} readings per request`)
        .superRefine((readings, ctx) => {
          for (let i = 0; i < readings.length; i++) {
            const r = readings[i]!;
            const t = Date.parse(r.at);
            if (!ISO_WITH_OFFSET.test(r.at)) {
              /* already named by the reading's own check */
            } else if (Number.isNaN(t) || !isRealIsoDateTime(r.at))
              ctx.addIssue({
                code: z.ZodIssueCode.custom,
                path: [i, 'at'],
                message: 'Time is not a real date and time',
              });
            else if (t > latest)
              ctx.addIssue({
                code: z.ZodIssueCode.custom,
                path: [i, 'at'],
                message: 'Time is in the future: check the gateway clock',
              });
            else if (t < earliest)
              ctx.addIssue({
                code: z.ZodIssueCode.custom,
                path: [i, 'at'],
                message: 'Older than 24 h: send older readings as a trend file',
              });
            if ((r.spo2 ?? null) === null && (r.heartRate ?? null) === null && r.trace !== 'absent') {
              ctx.addIssue({
                code: z.ZodIssueCode.custom,
                path: [i, 'spo2'],
                message: 'No SpO₂ and no heart rate: send trace "absent" for a probe-off reading',
              });
            }
          }
        }),
    })
    .strict('Unknown field in the batch');
}

export function toDeviceReading(r: z.output<typeof deviceReadingSchema>): DeviceReading {
  const spo2 = r.spo2 ?? null;
  return {
    at: new Date(r.at),
    spo2,
    heartRate: r.heartRate ?? null,
    perfusionIndex: r.perfusionIndex ?? null,
    trace: r.trace ?? defaultTrace(spo2),
  };
}
