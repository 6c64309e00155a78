import { z } from 'zod';
import { ROLES } from '../roles';

export const roleSchema = z.enum(ROLES);

export const emailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .pipe(z.email({ message: 'Enter a valid e-mail address' }))
  .refine((s) => s.length <= 254, 'E-mail address is too long');

export const personNameSchema = z.string().trim().min(1, 'Enter a name').max(120, 'Name is too long');

/** New passwords: at least 12 characters (and a sane upper bound for hashing). */
export const newPasswordSchema = z
  .string()
  .min(12, 'Use at least 12 characters')
  .max(200, 'Use at most 200 characters');

/** The user as the session and the rest of the app see it. */
export const sessionUserSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

/** The user as the admin screens see it. Dates are ISO 8601 strings (UTC). */
export const userSchema = sessionUserSchema.extend({
  active: z.boolean(),
  /** True while an invitation is open and no password has been chosen yet. */
  invited: z.boolean(),
  createdAt: z.string(),
  lastSignInAt: z.string().nullable(),
});
export type User = z.infer<typeof userSchema>;

export const userListResponseSchema = z.object({ users: z.array(userSchema) });
export type UserListResponse = z.infer<typeof userListResponseSchema>;

export const createUserBodySchema = z.strictObject({
  email: emailSchema,
  name: personNameSchema,
  role: roleSchema,
  /** Without a password the user gets an invitation e-mail instead. */
  password: newPasswordSchema.optional(),
});
export type CreateUserBody = z.infer<typeof createUserBodySchema>;

export const updateUserBodySchema = z
  .strictObject({
    name: personNameSchema.optional(),
    role: roleSchema.optional(),
    active: z.boolean().optional(),
  })
  .refine((b) => b.name !== undefined || b.role !== undefined || b.active !== undefined, {
    message: 'Nothing to change',
  });
export type UpdateUserBody = z.infer<typeof updateUserBodySchema>;
