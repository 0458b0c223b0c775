import { z } from 'zod';
import { roles } from '@/models/user';
import { emailSchema } from './account';

export const roleSchema = z.enum(roles, { error: `Choose one of: ${roles.join(', ')}.` });

export const invitationSchema = z.strictObject({
  email: emailSchema,
  role: roleSchema,
});

export const memberUpdateSchema = z.strictObject({ role: roleSchema });

export const teamSettingsSchema = z.strictObject({
  name: z.string().trim().min(1, { error: 'Enter a team name.' }).max(120).optional(),
  allowViewerDatasetExport: z.boolean({ error: 'Use true or false.' }).optional(),
});

export type InvitationInput = z.infer<typeof invitationSchema>;
export type TeamSettingsInput = z.infer<typeof teamSettingsSchema>;
