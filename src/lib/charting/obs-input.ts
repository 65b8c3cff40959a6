/**
 * The one schema for a charted observation, used by the entry form in the browser and by the
 * API on the server, so a nurse sees the same words in both places. Pure: `now` is passed in.
 */
import { z } from 'zod';
import { OXYGEN_DEVICES, TRACE_QUALITIES, type OxygenDevice } from '~/lib/oxygenation/types.ts';
import { CONSCIOUSNESS, type Consciousness } from '~/lib/oxygenation/news2.ts';

export const DEVICE_LABELS: Record<OxygenDevice, string> = {
  room_air: 'Room air',
  nasal_cannula: 'Nasal cannula',
  simple_mask: 'Simple mask',
  reservoir_mask: 'Reservoir mask',
  high_flow_nasal: 'High-flow nasal',
  niv: 'NIV',
  ventilator: 'Ventilator',
};

export const CONSCIOUSNESS_LABELS: Record<Consciousness, string> = {
  alert: 'Alert',
  new_confusion: 'New confusion',
  voice: 'Responds to voice',
  pain: 'Responds to pain',
  unresponsive: 'Unresponsive',
};

/** Devices whose FiO₂ is set on the machine: it must be charted, never estimated. */
export const SET_FIO2_DEVICES: readonly OxygenDevice[] = ['high_flow_nasal', 'niv', 'ventilator'];
/** Devices where a flow in L/min means something. */
export const FLOW_DEVICES: readonly OxygenDevice[] = [
  'nasal_cannula',
  'simple_mask',
  'reservoir_mask',
  'high_flow_nasal',
];

export const MAX_BACKDATE_HOURS = 4;
/** A little slack for clocks that disagree between a bedside PC and the server. */
export const FUTURE_SLACK_MS = 2 * 60_000;
export const CALIBRATED_FLOOR_PCT = 70;
/**
 * Obs taken on arrival are often charted a few minutes before the admission is entered; earlier
 * than this before the stay began, an obs would belong to another bed (or none) and is refused.
 */
export const BEFORE_STAY_SLACK_MS = 15 * 60_000;

const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);
const optionalNumber = (label: string, min: number, max: number, unit: string, opts: { int?: boolean } = {}) =>
  z.preprocess(
    emptyToUndefined,
    z.coerce
      .number({ invalid_type_error: `${label} must be a number` })
      .refine((v) => Number.isFinite(v), `${label} must be a number`)
      .refine((v) => !opts.int || Number.isInteger(v), `${label} must be a whole number`)
      .refine((v) => v >= min, `${label} under ${min}${unit} is not plausible — check the reading`)
      .refine((v) => v <= max, `${label} over ${max}${unit} is not plausible — check the reading`)
      .optional(),
  );

/** FiO₂ as typed: 0.21–1.0 as a fraction, or 21–100 as a percentage; stored as a fraction. */
export const fio2Field = z.preprocess(
  emptyToUndefined,
  z.coerce
    .number({ invalid_type_error: 'FiO₂ must be a number' })
    .refine((v) => Number.isFinite(v), 'FiO₂ must be a number')
    // 2–21 reads as a percentage under room air; just over 1 as a fraction over 1.0 (e.g. 1.01).
    .refine((v) => v >= 0.21 && !(v >= 2 && v < 21), 'FiO₂ cannot be under 21 % (0.21) — room air is 21 %')
    .refine((v) => !(v > 1 && v < 2) && v <= 100, 'FiO₂ cannot be over 100 % (1.0)')
    .transform((v) => Math.round((v > 1 ? v / 100 : v) * 1000) / 1000)
    .optional(),
);

export const obsFieldsSchema = z.object({
  takenAt: z.coerce.date({ errorMap: () => ({ message: 'Time taken must be a date and time' }) }),
  spo2: optionalNumber('SpO₂', 20, 100, ' %', { int: true }),
  heartRate: optionalNumber('Heart rate', 20, 300, '/min', { int: true }),
  respRate: optionalNumber('Respiratory rate', 2, 80, '/min', { int: true }),
  fio2: fio2Field,
  device: z.enum(OXYGEN_DEVICES as [OxygenDevice, ...OxygenDevice[]], {
    errorMap: () => ({ message: 'Choose the oxygen device (room air if none)' }),
  }),
  flowLpm: optionalNumber('Flow', 0.5, 80, ' L/min'),
  trace: z
    .enum(TRACE_QUALITIES as ['clean', 'weak', 'noisy', 'absent'], {
      errorMap: () => ({ message: 'Choose the trace quality' }),
    })
    .default('clean'),
  perfusionIndex: optionalNumber('Perfusion index', 0.01, 30, ' %'),
  probeSite: z.preprocess(emptyToUndefined, z.string().trim().max(32, 'Probe site: 32 characters at most').optional()),
  systolic: optionalNumber('Systolic BP', 40, 300, ' mmHg', { int: true }),
  temperature: optionalNumber('Temperature', 25, 45, ' °C'),
  consciousness: z.preprocess(
    emptyToUndefined,
    z.enum(CONSCIOUSNESS, { errorMap: () => ({ message: 'Choose a level of consciousness' }) }).optional(),
  ),
  note: z.preprocess(emptyToUndefined, z.string().trim().max(1000, 'Note: 1000 characters at most').optional()),
});

export type ObsFields = z.output<typeof obsFieldsSchema>;

/** A correction keeps the original's time, which may be older than the back-dating limit for new obs. */
export const CORRECTION_MAX_AGE_HOURS = 14 * 24;

/** Rules across fields and against the clock, shared by new obs and corrections. */
export function obsInputSchema(now: Date, maxBackdateHours = MAX_BACKDATE_HOURS) {
  return obsFieldsSchema.superRefine((o, ctx) => {
    const t = o.takenAt.getTime();
    if (t > now.getTime() + FUTURE_SLACK_MS) {
      ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['takenAt'], message: 'Time taken cannot be in the future' });
    }
    if (t < now.getTime() - maxBackdateHours * 3_600_000) {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['takenAt'],
        message:
          maxBackdateHours === MAX_BACKDATE_HOURS
            ? `Obs can be back-dated by ${MAX_BACKDATE_HOURS} hours at most`
            : `A correction can reach back ${maxBackdateHours / 24} days at most`,
      });
    }
    if (o.spo2 === undefined && o.trace !== 'absent') {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['spo2'],
        message: 'Enter SpO₂, or set the trace to "absent" if there is no reading',
      });
    }
    if (SET_FIO2_DEVICES.includes(o.device) && o.fio2 === undefined) {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['fio2'],
        message: `Chart the FiO₂ set on the ${DEVICE_LABELS[o.device]} — it is never estimated`,
      });
    }
    if (o.device === 'room_air' && o.fio2 !== undefined && o.fio2 !== 0.21) {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['fio2'],
        message: 'On room air FiO₂ is 21 % — choose the oxygen device in use',
      });
    }
    if (o.device === 'high_flow_nasal' && o.flowLpm === undefined) {
      ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['flowLpm'], message: 'Chart the high-flow rate in L/min' });
    }
    if (o.flowLpm !== undefined && !FLOW_DEVICES.includes(o.device)) {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['flowLpm'],
        message: `Flow does not apply to ${DEVICE_LABELS[o.device]}`,
      });
    }
  });
}

export type ObsInput = z.output<ReturnType<typeof obsInputSchema>>;

/** Notices that do not refuse the obs but must be shown with it. */
export function obsNotices(o: Pick<ObsFields, 'spo2'>): string[] {
  const notices: string[] = [];
  if (o.spo2 !== undefined && o.spo2 < CALIBRATED_FLOOR_PCT) {
    notices.push('Below calibrated range — confirm with arterial blood gas');
  }
  return notices;
}

export const correctionSchema = (now: Date) =>
  z.object({
    reason: z
      .string({ required_error: 'Give the reason for the correction' })
      .trim()
      .min(3, 'Give the reason for the correction')
      .max(500),
    obs: obsInputSchema(now, CORRECTION_MAX_AGE_HOURS),
  });

export const enteredInErrorSchema = z.object({
  reason: z
    .string({ required_error: 'Give the reason this entry is in error' })
    .trim()
    .min(3, 'Give the reason this entry is in error')
    .max(500),
});
