import { z } from 'zod';
import { newPasswordSchema, sessionUserSchema } from './users';

export const signInBodySchema = z.strictObject({
  email: z.string().trim().toLowerCase().min(1, 'Enter your e-mail address').max(254),
  password: z.string().min(1, 'Enter your password').max(200),
});
export type SignInBody = z.infer<typeof signInBodySchema>;

/** Raw CASL rules; the client rebuilds the ability with abilityFromRules (shared/abilities.ts). */
export const rulesSchema = z.array(z.record(z.string(), z.unknown()));

export const sessionResponseSchema = z.object({
  user: sessionUserSchema,
  rules: rulesSchema,
  csrfToken: z.string(),
});
export type SessionResponse = z.infer<typeof sessionResponseSchema>;

export const changePasswordBodySchema = z.strictObject({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: newPasswordSchema,
});
export type ChangePasswordBody = z.infer<typeof changePasswordBodySchema>;

export const invitationParamsSchema = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'Malformed invitation token') });
export type InvitationParams = z.infer<typeof invitationParamsSchema>;

export const invitationResponseSchema = z.object({ email: z.string(), name: z.string() });
export type InvitationResponse = z.infer<typeof invitationResponseSchema>;

export const acceptInvitationBodySchema = z.strictObject({ password: newPasswordSchema });
export type AcceptInvitationBody = z.infer<typeof acceptInvitationBodySchema>;
