/** The target-band order as the intensivist writes it: one schema for form and API. */
import { z } from 'zod';
import { PUBLISHED_TARGET_BANDS } from '~/lib/oxygenation/constants.ts';

export const BAND_MIN = 80;
export const BAND_MAX = 100;
export const BAND_MIN_WIDTH = 2;
/** NEWS2 Scale 2 is meant for a band topping out at 92 % or below, unless a reason is given. */
export const SCALE2_MAX_HIGH = 92;

export const TARGET_PRESETS = PUBLISHED_TARGET_BANDS.map((p) => ({
  id: p.id,
  low: p.low,
  high: p.high,
  source: p.source,
}));
type PresetId = (typeof PUBLISHED_TARGET_BANDS)[number]['id'];

const whole = (label: string) =>
  z.coerce
    .number({ invalid_type_error: `${label} must be a number` })
    .int(`${label} must be a whole number`)
    .min(BAND_MIN, `${label} must be at least ${BAND_MIN} %`)
    .max(BAND_MAX, `${label} cannot be over ${BAND_MAX} %`);

export const targetOrderSchema = z
  .object({
    low: whole('Lower limit'),
    high: whole('Upper limit'),
    preset: z.enum(TARGET_PRESETS.map((p) => p.id) as [PresetId, ...PresetId[]]).nullish(),
    reason: z
      .string({ required_error: 'Give the reason for this band' })
      .trim()
      .min(3, 'Give the reason for this band')
      .max(500),
    news2Scale: z
      .union([z.literal(1), z.literal(2)], { errorMap: () => ({ message: 'NEWS2 scale is 1 or 2' }) })
      .default(1),
    scaleReason: z.preprocess((v) => (v === '' ? undefined : v), z.string().trim().max(500).optional()),
    /** The order the writer was looking at (null when none): a newer one means their view is stale. */
    basedOnOrderId: z.number().int().positive().nullable(),
  })
  .superRefine((o, ctx) => {
    if (o.high - o.low < BAND_MIN_WIDTH) {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['high'],
        message: `The upper limit must be at least ${BAND_MIN_WIDTH} points above the lower`,
      });
    }
    if (o.preset) {
      const p = TARGET_PRESETS.find((x) => x.id === o.preset)!;
      if (p.low !== o.low || p.high !== o.high) {
        ctx.addIssue({
          code: z.ZodIssueCode.custom,
          path: ['preset'],
          message: `The preset is ${p.low}–${p.high} %; clear it to order another band`,
        });
      }
    }
    if (o.news2Scale === 2 && o.high > SCALE2_MAX_HIGH && !o.scaleReason) {
      ctx.addIssue({
        code: z.ZodIssueCode.custom,
        path: ['scaleReason'],
        message: `Scale 2 with a band above ${SCALE2_MAX_HIGH} % needs a reason`,
      });
    }
  });

export type TargetOrderInput = z.output<typeof targetOrderSchema>;
