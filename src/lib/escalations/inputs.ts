import { z } from 'zod';
import { OUTCOMES } from './decide.ts';

export const listEscalationsQuery = z.object({
  state: z.enum(['open', 'closed'], { errorMap: () => ({ message: 'state is open or closed' }) }).default('open'),
  unit: z.string().trim().min(1).max(16).optional(),
  kind: z.enum(['below_band', 'probe_check', 'wean_prompt', 'occult_hypoxaemia']).optional(),
  patient: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(200),
});

export const closeSchema = z.object({
  outcome: z.enum(OUTCOMES, { errorMap: () => ({ message: 'Choose the outcome of this escalation' }) }),
  note: z.string().trim().max(1000, 'Note: 1000 characters at most').optional(),
});

const minutes = (label: string, min: number, max: number) =>
  z
    .number({ invalid_type_error: `${label} must be a number`, required_error: `${label} is required` })
    .int(`${label} must be a whole number`)
    .min(min, `${label}: at least ${min}`)
    .max(max, `${label}: at most ${max}`);

/** Unit settings as an admin edits them. Ranges keep the checks meaningful; values are local decisions. */
export const unitSettingsSchema = z
  .object({
    consecutiveCharted: minutes('Consecutive charted obs', 1, 6),
    deviceDwellMin: minutes('Device dwell (min)', 1, 60),
    urgentMarginPoints: minutes('Urgent margin (points)', 1, 15),
    urgentFloorPct: minutes('Urgent floor (%)', 70, 92),
    cannotVerifyMin: minutes('Cannot-verify time (min)', 5, 120),
    aboveOnOxygenMin: minutes('Above band on O₂ time (min)', 10, 240),
    renotifyMin: minutes('Re-notify after (min)', 5, 120),
    overdueMin: minutes('Obs overdue after (min)', 30, 240),
    // Optional, so a client that does not know these settings keeps the defaults.
    unitPhone: z
      .string()
      .trim()
      .max(40, 'Unit phone: 40 characters at most')
      .regex(/^[0-9+()\-. x]*$/, 'Unit phone: digits, spaces and + ( ) - . x only')
      .nullable()
      .optional()
      .transform((v) => (v ? v : null)),
    monitorSilentMin: minutes('Monitor silent after (min)', 1, 30).default(3),
    silentBelowProbeMin: minutes('Silent after below band: probe check after (min)', 1, 30).default(3),
    outreachEmails: z
      .array(z.string().trim().toLowerCase().email('Not an e-mail address'))
      .min(1, 'Give at least one outreach e-mail address')
      .max(20),
    /** Blood-gas display unit and barometric pressure; left out, the unit keeps what it has. */
    gasUnit: z.enum(['kPa', 'mmHg'], { errorMap: () => ({ message: 'Gas unit is kPa or mmHg' }) }).optional(),
    barometricMmHg: minutes('Barometric pressure (mmHg)', 500, 800).optional(),
    // Shift times for the handover sheet, wall clock in the unit's zone; left out = unchanged.
    shiftStart: z
      .string()
      .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Shift start as HH:MM, 24-hour')
      .optional(),
    shiftEnd: z
      .string()
      .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Shift end as HH:MM, 24-hour')
      .optional(),
  })
  .refine((v) => v.shiftStart === undefined || v.shiftEnd === undefined || v.shiftStart !== v.shiftEnd, {
    message: 'Shift start and end must differ',
    path: ['shiftEnd'],
  });
export type UnitSettingsInput = z.output<typeof unitSettingsSchema>;
