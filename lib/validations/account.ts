import { z } from 'zod';
import { passwordSchema } from '../auth/passwords';

export const emailSchema = z
  .string({ error: 'Enter an e-mail address.' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'Enter a valid e-mail address.' }).max(254));

export const profileSchema = z.strictObject({
  name: z
    .string({ error: 'Enter your name.' })
    .trim()
    .min(1, { error: 'Enter your name.' })
    .max(120, { error: 'Use at most 120 characters.' }),
});

export const passwordChangeSchema = z.strictObject({
  currentPassword: z
    .string({ error: 'Enter your current password.' })
    .min(1, { error: 'Enter your current password.' }),
  newPassword: passwordSchema,
});

export const tokenCreateSchema = z.strictObject({
  name: z
    .string({ error: 'Name the token.' })
    .trim()
    .min(1, { error: 'Name the token, e.g. "trial laptop".' })
    .max(80, { error: 'Use at most 80 characters.' }),
});

export const resetRequestSchema = z.strictObject({ email: emailSchema });

export const linkCompleteSchema = z.strictObject({
  token: z
    .string({ error: 'The link token is missing.' })
    .min(10, { error: 'The link token is missing or cut short.' })
    .max(200),
  password: passwordSchema,
  name: z.string().trim().min(1, { error: 'Enter your name.' }).max(120).optional(),
});

export type ProfileInput = z.infer<typeof profileSchema>;
export type PasswordChangeInput = z.infer<typeof passwordChangeSchema>;
export type TokenCreateInput = z.infer<typeof tokenCreateSchema>;
export type LinkCompleteInput = z.infer<typeof linkCompleteSchema>;
