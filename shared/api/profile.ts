import * as z from 'zod';

/** GET/PATCH /api/profile: the signed-in person's own choices. */
export const profileSchema = z.object({
  email: z.string(),
  displayName: z.string(),
  role: z.string(),
  dailyDigest: z.boolean(),
});
export type Profile = z.infer<typeof profileSchema>;

export const profilePatchSchema = z.strictObject(
  {
    dailyDigest: z.boolean({ error: 'dailyDigest must be true or false.' }).optional(),
    displayName: z.string().trim().min(1, 'Your display name cannot be empty.').max(100, 'Display names are at most 100 characters.').optional(),
  },
  { error: (i) => (i.code === 'unrecognized_keys' ? 'Only dailyDigest and displayName can be changed here.' : 'Send a JSON object.') },
);
export type ProfilePatch = z.infer<typeof profilePatchSchema>;
