import * as z from 'zod';
import { roleSchema } from '../roles.js';

/** POST /api/auth/login body. */
export const loginRequestSchema = z.object({
  email: z.string().trim().min(1, 'Enter your e-mail address.').email('Enter a valid e-mail address.'),
  password: z.string().min(1, 'Enter your password.').max(1024, 'Passwords are at most 1024 characters.'),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

/** The signed-in user as the API shows it (never the password hash). */
export const sessionUserSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  role: roleSchema,
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

/** Body of POST /api/auth/login (200) and GET /api/auth/me (200). */
export const sessionResponseSchema = z.object({ user: sessionUserSchema });
export type SessionResponse = z.infer<typeof sessionResponseSchema>;

/** CSRF: double-submit cookie and header, Angular HttpClient's default names. */
export const CSRF_COOKIE = 'XSRF-TOKEN';
export const CSRF_HEADER = 'X-XSRF-TOKEN';
