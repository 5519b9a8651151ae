import * as z from 'zod';
import { roleSchema } from '../roles.js';
import { userSummarySchema } from './users.js';

/** Passwords set by an admin or through a one-time link: long enough to resist guessing. */
export const newPasswordSchema = z
  .string({ error: 'Enter a password.' })
  .min(12, 'Passwords must be at least 12 characters.')
  .max(1024, 'Passwords are at most 1024 characters.');

/**
 * POST /api/users: create an account. With `password` the account is ready at once; without
 * it, an invitation with a one-time link is mailed (and shown in the Outbox).
 */
export const createUserSchema = z.object({
  email: z.string().trim().min(1, 'Enter the e-mail address.').email('Enter a valid e-mail address, e.g. a.person@example.org.'),
  displayName: z.string().trim().min(1, 'Enter the person\'s name.').max(100, 'Names are at most 100 characters.'),
  role: roleSchema,
  password: newPasswordSchema.optional(),
});
export type CreateUserRequest = z.infer<typeof createUserSchema>;

/** PATCH /api/users/:id: any subset. */
export const updateUserSchema = z.strictObject(
  {
    role: roleSchema.optional(),
    disabled: z.boolean({ error: 'disabled must be true or false.' }).optional(),
    displayName: z.string().trim().min(1, 'Names cannot be empty.').max(100, 'Names are at most 100 characters.').optional(),
  },
  {
    error: (i) =>
      i.code === 'unrecognized_keys' ? 'Only role, disabled and displayName can be changed here; passwords go through reset-password.' : 'Send a JSON object.',
  },
);
export type UpdateUserRequest = z.infer<typeof updateUserSchema>;

/** POST /api/users/:id/reset-password: set a password now, or (empty body) mail a one-time link. */
export const resetPasswordSchema = z.object({ password: newPasswordSchema.optional() });

/** Answer of create / reset when a one-time link was made: where it went. */
export const userActionResponseSchema = z.object({
  user: userSummarySchema,
  /** The link that was mailed, for an admin to pass on by hand if mail is down. */
  link: z.string().optional(),
  mailed: z.boolean().optional(),
});
export type UserActionResponse = z.infer<typeof userActionResponseSchema>;

/** GET /api/account-links/:secret answer and POST body. */
export const accountLinkInfoSchema = z.object({ email: z.string(), displayName: z.string(), purpose: z.enum(['invite', 'password-reset']), expiresAt: z.string() });
export type AccountLinkInfo = z.infer<typeof accountLinkInfoSchema>;
export const useAccountLinkSchema = z.object({ password: newPasswordSchema });
