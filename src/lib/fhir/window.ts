import { z } from 'zod';

/** The export's window: ISO 8601 with an offset; `to` defaults to now, `from` to 24 h before `to`; at most 31 days. */
export const FHIR_MAX_WINDOW_DAYS = 31;
const ISO = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d{1,3})?)?(?:Z|[+-]\d{2}:\d{2})$/;

const instant = (label: string) =>
  z
    .string()
    .regex(ISO, `${label} must be ISO 8601 with Z or an offset, e.g. 2026-12-02T06:00:00Z`)
    .refine((s) => {
      // A real calendar date: Date would roll 2026-11-31 over into December.
      const [y, m, d] = s.slice(0, 10).split('-').map(Number);
      const probe = new Date(Date.UTC(y!, m! - 1, d!));
      return probe.getUTCMonth() === m! - 1 && probe.getUTCDate() === d && !Number.isNaN(Date.parse(s));
    }, `${label} is not a real date and time`)
    .transform((s) => new Date(s));

export function fhirWindowSchema(now: Date) {
  return z
    .object({ from: instant('from').optional(), to: instant('to').optional() })
    .transform(({ from, to }) => {
      const end = to ?? now;
      return { from: from ?? new Date(end.getTime() - 24 * 3_600_000), to: end };
    })
    .superRefine((w, ctx) => {
      if (w.from > w.to)
        ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['from'], message: 'from must be before to' });
      else if (w.to.getTime() - w.from.getTime() > FHIR_MAX_WINDOW_DAYS * 86_400_000)
        ctx.addIssue({
          code: z.ZodIssueCode.custom,
          path: ['from'],
          message: `At most ${FHIR_MAX_WINDOW_DAYS} days per export`,
        });
    });
}
