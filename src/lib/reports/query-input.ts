/** Query parameters of the report and handover endpoints and pages. */
import { z } from 'zod';
import { REPORT_DAYS, type ReportDays } from './api-types.ts';

export const reportQuery = z.object({
  days: z.coerce
    .number({ invalid_type_error: 'days must be 7, 30 or 90' })
    .int()
    .refine((d): d is ReportDays => (REPORT_DAYS as readonly number[]).includes(d), 'days must be 7, 30 or 90')
    .default(7),
});

export const unitCodeParam = z.object({ code: z.string().min(1).max(16) });

export const handoverQuery = z.object({
  unit: z.string().min(1).max(16).optional(),
  scope: z.enum(['mine', 'unit'], { message: 'scope must be mine or unit' }).optional(),
});
