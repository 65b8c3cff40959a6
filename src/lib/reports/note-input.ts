/** One schema for the handover note form and its endpoint. */
import { z } from 'zod';

export const handoverNoteInput = z.object({
  note: z
    .string({ required_error: 'Write the note' })
    .trim()
    .min(1, 'Write the note')
    .max(4000, 'At most 4,000 characters'),
  /** The version the writer saw (null for the first note): a newer one in between gives 409. */
  basedOnVersion: z.number().int().min(1).nullable(),
});
export type HandoverNoteInput = z.output<typeof handoverNoteInput>;
