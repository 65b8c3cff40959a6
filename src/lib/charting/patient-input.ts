import { z } from 'zod';

const name = (label: string) =>
  z
    .string({ required_error: `${label} is required` })
    .trim()
    .min(1, `${label} is required`)
    .max(80, `${label}: 80 characters at most`);

export const admitSchema = z.object({
  givenName: name('Given name'),
  familyName: name('Family name'),
  mrn: z
    .string({ required_error: 'MRN is required' })
    .trim()
    .toUpperCase()
    .regex(/^[A-Z0-9-]{3,20}$/, 'MRN: 3–20 letters, digits or hyphens'),
  dateOfBirth: z
    .string({ required_error: 'Date of birth is required' })
    .regex(/^\d{4}-\d{2}-\d{2}$/, 'Date of birth as YYYY-MM-DD')
    .refine(
      (s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
      'Date of birth is not a real date',
    )
    .refine((s) => Date.parse(`${s}T00:00:00Z`) <= Date.now(), 'Date of birth cannot be in the future')
    .refine(
      (s) => Date.parse(`${s}T00:00:00Z`) >= Date.parse('1900-01-01T00:00:00Z'),
      'Date of birth before 1900 is not plausible',
    ),
  co2RetentionRisk: z.boolean().default(false),
  bedId: z.number({ required_error: 'Choose a bed', invalid_type_error: 'Choose a bed' }).int().positive(),
});
export type AdmitInput = z.output<typeof admitSchema>;

export const moveSchema = z.object({
  bedId: z.number({ required_error: 'Choose a bed', invalid_type_error: 'Choose a bed' }).int().positive(),
});

export const dischargeSchema = z.object({ note: z.string().trim().max(500).optional() });

export const idParam = z.object({
  id: z.coerce
    .number({ invalid_type_error: 'must be a number' })
    .int('must be a whole number')
    .positive('must be positive'),
});
