/** Request schemas for staff accounts, units and beds: shared by the admin islands and the endpoints. */
import { z } from 'zod';
import { ROLES, spansUnits, type Role } from '~/lib/auth/roles.ts';

export const unitCodeSchema = z
  .string()
  .trim()
  .toUpperCase()
  .regex(/^[A-Z0-9-]{2,16}$/, 'Use 2–16 letters, digits or dashes');

/** Nurses and charge nurses belong to one unit; the other roles must not name one. */
export function unitRuleProblem(role: Role, unitCode: string | null | undefined): string | null {
  if (spansUnits(role) || role === 'admin')
    return unitCode ? `A ${role} works across units; leave the unit empty` : null;
  return unitCode ? null : `A ${role === 'charge' ? 'charge nurse' : 'nurse'} needs a unit`;
}

const nameSchema = z.string().trim().min(2, 'Give the full name').max(120, 'At most 120 characters');
const emailSchema = z.string().trim().toLowerCase().email('Not an e-mail address').max(190, 'At most 190 characters');
const roleSchema = z.enum(ROLES, { errorMap: () => ({ message: `One of ${ROLES.join(', ')}` }) });

export const createUserSchema = z
  .object({
    name: nameSchema,
    email: emailSchema,
    role: roleSchema,
    unitCode: unitCodeSchema.nullish(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const problem = unitRuleProblem(v.role, v.unitCode);
    if (problem) ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['unitCode'], message: problem });
  });
export type CreateUserInput = z.infer<typeof createUserSchema>;

/** A change of name, role or unit: the role–unit rule is checked on the merged result by the service. */
export const updateUserSchema = z
  .object({
    name: nameSchema.optional(),
    role: roleSchema.optional(),
    unitCode: unitCodeSchema.nullable().optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change', path: ['_'] });
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

/** Reason text for deactivation (kept in the audit trail). */
export const deactivateSchema = z.object({ reason: z.string().trim().max(500).optional() }).strict();

// IANA names as the runtime knows them, so a unit's zone always formats.
function isTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: zone });
    return zone.includes('/') || zone === 'UTC';
  } catch {
    return false;
  }
}

export const createUnitSchema = z
  .object({
    code: unitCodeSchema,
    name: z.string().trim().min(2, 'Give the unit a name').max(80, 'At most 80 characters'),
    hospital: z.string().trim().min(2, 'Name the hospital').max(80, 'At most 80 characters'),
    timeZone: z.string().trim().refine(isTimeZone, 'Not a time zone name such as Europe/London'),
  })
  .strict();
export type CreateUnitInput = z.infer<typeof createUnitSchema>;

export const updateUnitSchema = z
  .object({
    name: z.string().trim().min(2, 'Give the unit a name').max(80, 'At most 80 characters').optional(),
    hospital: z.string().trim().min(2, 'Name the hospital').max(80, 'At most 80 characters').optional(),
  })
  .strict()
  .refine((v) => v.name !== undefined || v.hospital !== undefined, { message: 'Nothing to change', path: ['_'] });

export const bedLabelSchema = z.string().trim().min(1, 'Give the bed a label').max(16, 'At most 16 characters');
export const addBedSchema = z.object({ label: bedLabelSchema }).strict();
export const renameBedSchema = z.object({ label: bedLabelSchema }).strict();
export const reorderBedsSchema = z
  .object({ bedIds: z.array(z.number().int().positive()).min(1, 'List the beds').max(200) })
  .strict()
  .refine((v) => new Set(v.bedIds).size === v.bedIds.length, { message: 'A bed appears twice', path: ['bedIds'] });
export const retireBedSchema = z
  .object({ reason: z.string().trim().min(3, 'Say why the bed is retired').max(500) })
  .strict();
