/** Bodies of the two password routes (the policy itself is checked with the person's e-mail on the server). */
import { z } from 'zod';

export const changePasswordSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password').max(200),
    newPassword: z.string().min(1, 'Enter a new password').max(200, 'At most 72 bytes'),
  })
  .strict();

export const linkPasswordSchema = z
  .object({
    token: z.string().min(1, 'The link is incomplete').max(200),
    password: z.string().min(1, 'Enter a password').max(200, 'At most 72 bytes'),
  })
  .strict();
