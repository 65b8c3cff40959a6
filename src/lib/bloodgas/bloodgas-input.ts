/**
 * The one schema for a charted blood gas, used by the entry form in the browser and by the API on
 * the server, so a nurse reads the same words in both places. Pure: `now` is passed in.
 * Pressures arrive in the unit the nurse typed (kPa or mmHg) and are refused against bounds in
 * that unit; the server stores mmHg.
 */
import { z } from 'zod';
import { fio2Field, FUTURE_SLACK_MS } from '~/lib/charting/obs-input.ts';
import { GAS_UNITS, MMHG_PER_KPA, SAMPLE_TYPES, type GasUnit } from './compute.ts';

/** Plausible bounds in mmHg (outside these a value is a typing or unit slip, not a patient). */
export const GAS_BOUNDS_MMHG = { pao2: { min: 10, max: 800 }, paco2: { min: 5, max: 200 } } as const;
export const PH_BOUNDS = { min: 6.5, max: 8.0 } as const;
export const SAMPLE_TYPE_LABELS = { arterial: 'Arterial', venous: 'Venous', capillary: 'Capillary' } as const;
/** A gas is charted from the analyser's printout; it may come hours after the sample, but not days. */
export const GAS_MAX_BACKDATE_HOURS = 24;

const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);
const num = (label: string) =>
  z.coerce
    .number({ invalid_type_error: `${label} must be a number`, required_error: `Enter ${label}` })
    .refine((v) => Number.isFinite(v), `${label} must be a number`);
const required = (label: string, min: number, max: number, unit: string) =>
  z.preprocess(
    emptyToUndefined,
    num(label)
      .refine((v) => v >= min, `${label} under ${min}${unit} is not plausible — check the value`)
      .refine((v) => v <= max, `${label} over ${max}${unit} is not plausible — check the value`),
  );
const optional = (label: string, min: number, max: number, unit: string) =>
  z.preprocess(
    emptyToUndefined,
    num(label)
      .refine((v) => v >= min, `${label} under ${min}${unit} is not plausible — check the value`)
      .refine((v) => v <= max, `${label} over ${max}${unit} is not plausible — check the value`)
      .optional(),
  );

/** Bounds of a pressure in the unit it was typed in, for the message and the check. */
export function gasBounds(field: 'pao2' | 'paco2', unit: GasUnit): { min: number; max: number } {
  const b = GAS_BOUNDS_MMHG[field];
  return unit === 'kPa'
    ? { min: Math.round((b.min / MMHG_PER_KPA) * 10) / 10, max: Math.round((b.max / MMHG_PER_KPA) * 10) / 10 }
    : { ...b };
}

/** Hb as typed: g/dL (2–25) or g/L (30–250, as UK analysers print it); stored in g/dL. */
const hbField = z.preprocess(
  emptyToUndefined,
  num('Hb')
    .refine((v) => v >= 2, 'Hb under 2 g/dL is not plausible — check the value')
    .refine((v) => !(v > 25 && v < 30), 'Hb: give g/dL (2–25) or g/L (30–250)')
    .refine((v) => v <= 250, 'Hb over 250 g/L is not plausible — check the value')
    .transform((v) => (v >= 30 ? Math.round(v) / 10 : Math.round(v * 10) / 10))
    .optional(),
);

export const bloodGasFieldsSchema = z.object({
  sampledAt: z.coerce.date({ errorMap: () => ({ message: 'Sample time must be a date and time' }) }),
  sampleType: z.enum(SAMPLE_TYPES, {
    errorMap: () => ({ message: 'Choose the sample type (arterial, venous or capillary)' }),
  }),
  gasUnit: z.enum(GAS_UNITS, { errorMap: () => ({ message: 'Gas unit is kPa or mmHg' }) }),
  ph: required('pH', PH_BOUNDS.min, PH_BOUNDS.max, ''),
  pao2: z.preprocess(emptyToUndefined, num('PaO₂')),
  paco2: z.preprocess(emptyToUndefined, num('PaCO₂')),
  sao2: required('SaO₂', 20, 100, ' %'),
  hco3: optional('HCO₃⁻', 2, 60, ' mmol/L'),
  baseExcess: optional('Base excess', -40, 40, ' mmol/L'),
  lactate: optional('Lactate', 0, 40, ' mmol/L'),
  hb: hbField,
  fio2: fio2Field.refine((v) => v !== undefined, 'Enter the FiO₂ at the time of sampling'),
  spo2AtSample: optional('SpO₂ at sampling', 20, 100, ' %').refine(
    (v) => v === undefined || Number.isInteger(v),
    'SpO₂ at sampling must be a whole number',
  ),
  note: z.preprocess(emptyToUndefined, z.string().trim().max(1000, 'Note: 1000 characters at most').optional()),
});

export function bloodGasInputSchema(now: Date, maxBackdateHours = GAS_MAX_BACKDATE_HOURS) {
  return bloodGasFieldsSchema.superRefine((g, ctx) => {
    const t = g.sampledAt.getTime();
    if (t > now.getTime() + FUTURE_SLACK_MS)
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['sampledAt'],
        message: 'Sample time cannot be in the future',
      });
    if (t < now.getTime() - maxBackdateHours * 3_600_000)
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['sampledAt'],
        message: `A blood gas can be charted up to ${maxBackdateHours >= 48 ? `${maxBackdateHours / 24} days` : `${maxBackdateHours} hours`} after sampling`,
      });
    for (const [field, label] of [
      ['pao2', 'PaO₂'],
      ['paco2', 'PaCO₂'],
    ] as const) {
      const b = gasBounds(field, g.gasUnit);
      const v = g[field];
      if (v < b.min)
        ctx.addIssue({
          code: z.ZodIssueCode.custom,
          path: [field],
          message: `${label} under ${b.min} ${g.gasUnit} is not plausible — check the value and the unit`,
        });
      else if (v > b.max)
        ctx.addIssue({
          code: z.ZodIssueCode.custom,
          path: [field],
          message: `${label} over ${b.max} ${g.gasUnit} is not plausible — check the value and the unit`,
        });
    }
  });
}
export type BloodGasInput = z.output<ReturnType<typeof bloodGasInputSchema>>;

/** A correction keeps the original's sample time, which may be older than the charting limit. */
export const GAS_CORRECTION_MAX_AGE_HOURS = 14 * 24;
export const bloodGasCorrectionSchema = (now: Date) =>
  z.object({
    reason: z
      .string({ required_error: 'Give the reason for the correction' })
      .trim()
      .min(3, 'Give the reason for the correction')
      .max(500),
    gas: bloodGasInputSchema(now, GAS_CORRECTION_MAX_AGE_HOURS),
  });

export { enteredInErrorSchema } from '~/lib/charting/obs-input.ts';
