import { z } from 'zod';

/** HD component text as sent in MSH-3 / MSH-4: no HL7 delimiters. */
const hd = (label: string) =>
  z
    .string({ required_error: `${label} is required` })
    .trim()
    .min(1, `${label} is required`)
    .max(64, '64 characters at most')
    .regex(/^[^|^~\\&\r\n]+$/, `${label} cannot contain | ^ ~ \\ or &`);

export const gatewayCreateSchema = z
  .object({
    label: z
      .string({ required_error: 'Name the gateway' })
      .trim()
      .min(2, 'Name the gateway')
      .max(80, '80 characters at most'),
    sendingApplication: hd('Sending application (MSH-3)'),
    sendingFacility: z
      .string()
      .trim()
      .max(64, '64 characters at most')
      .regex(/^[^|^~\\&\r\n]*$/, 'Sending facility cannot contain | ^ ~ \\ or &')
      .default(''),
  })
  .strict();

export const gatewayBedSchema = z
  .object({
    // PV1-3 as the gateway sends it: point of care^room^bed (empty parts allowed, e.g. ICU4^^B03).
    bedName: z
      .string({ required_error: 'The bed name as sent in PV1-3 is required' })
      .trim()
      .min(1, 'The bed name as sent in PV1-3 is required')
      .max(120, '120 characters at most')
      .regex(/^[^|~\\&\r\n]+$/, 'Use ^ between point of care, room and bed; no | ~ \\ or &')
      .transform((s) => s.replace(/\^+$/, '')),
    bedId: z.number({ required_error: 'Choose a bed', invalid_type_error: 'Choose a bed' }).int().positive(),
  })
  .strict();

export const revokeSchema = z
  .object({
    reason: z
      .string({ required_error: 'Give a reason' })
      .trim()
      .min(2, 'Give a reason')
      .max(200, '200 characters at most'),
  })
  .strict();
