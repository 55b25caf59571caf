import { z } from 'zod';
import { recordId, singleLine } from './common.js';

/** Usernames: 2-40 lowercase letters, digits, ".", "_" or "-", starting with a letter or digit. */
export const username = z
  .string()
  .trim()
  .toLowerCase()
  .regex(/^[a-z0-9][a-z0-9._-]{1,39}$/, 'must be 2-40 lowercase letters, digits, ".", "_" or "-", starting with a letter or digit');

/** Passwords: 10-200 characters (length over composition rules, common practice after NIST SP 800-63B). */
export const newPassword = z
  .string()
  .min(10, 'must have at least 10 characters')
  .max(200, 'must have at most 200 characters');

export const user = z.object({
  id: recordId,
  username: z.string(),
  displayName: z.string(),
  /** Site administrators manage user accounts and see every project. */
  isAdmin: z.boolean(),
  /** A disabled account cannot sign in and its sessions end. */
  disabled: z.boolean(),
});
export type User = z.infer<typeof user>;

export const userList = z.array(user);
export type UserList = z.infer<typeof userList>;

export const createUserBody = z.strictObject({
  username,
  displayName: singleLine(120, 1),
  password: newPassword,
  isAdmin: z.boolean().default(false),
});
export type CreateUserBody = z.input<typeof createUserBody>;

/** Admin changes to an account; `password` sets a new password and ends that user's sessions. */
export const updateUserBody = z
  .strictObject({
    displayName: singleLine(120, 1).optional(),
    isAdmin: z.boolean().optional(),
    disabled: z.boolean().optional(),
    password: newPassword.optional(),
  })
  .refine((body) => Object.keys(body).length > 0, 'must change at least one field');
export type UpdateUserBody = z.input<typeof updateUserBody>;
