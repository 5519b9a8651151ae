import * as z from 'zod';
import { roleSchema } from '../roles.js';

/** A user as the admin list shows it (never the password hash). */
export const userSummarySchema = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  role: roleSchema,
  disabled: z.boolean(),
  createdAt: z.string(),
});
export type UserSummary = z.infer<typeof userSummarySchema>;

/** GET /api/users (admin). */
export const userListResponseSchema = z.object({ users: z.array(userSummarySchema) });
export type UserListResponse = z.infer<typeof userListResponseSchema>;
