import { z } from 'zod';
import { newPassword } from './users.js';

/** Sign-in: the username is matched case-insensitively; nothing says which of the two was wrong. */
export const signInBody = z.strictObject({
  username: z.string().trim().toLowerCase().min(1, 'must not be empty').max(200, 'must have at most 200 characters'),
  password: z.string().min(1, 'must not be empty').max(200, 'must have at most 200 characters'),
});
export type SignInBody = z.infer<typeof signInBody>;

/** Change one's own password; other sessions of the user end, this one stays. */
export const changePasswordBody = z
  .strictObject({
    currentPassword: z.string().min(1, 'must not be empty').max(200, 'must have at most 200 characters'),
    newPassword,
  })
  .refine((body) => body.currentPassword !== body.newPassword, {
    path: ['newPassword'],
    message: 'must differ from the current password',
  });
export type ChangePasswordBody = z.infer<typeof changePasswordBody>;
