import { z } from 'zod';
import { NewPassword } from './users.js';

/**
 * Body of `PUT /api/me/password`: the signed-in user changes their own password. The current
 * one is asked again so a borrowed, unlocked browser cannot take the account over.
 */
export const ChangePasswordRequest = z
  .object({
    currentPassword: z.string().min(1, 'required').max(1024),
    newPassword: NewPassword,
  })
  .refine((body) => body.newPassword !== body.currentPassword, { path: ['newPassword'], message: 'must differ from the current password' });
export type ChangePasswordRequest = z.infer<typeof ChangePasswordRequest>;
