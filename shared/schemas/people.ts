import { z } from 'zod';
import { ROLES } from '../roles';

/** A person's name as they want it shown. */
export const personNameSchema = z.string().trim().min(1, 'name is required').max(200, 'name is at most 200 characters');

/** An e-mail address, compared and stored in lower case. */
export const emailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .max(320, 'email is at most 320 characters')
  .pipe(z.email({ message: 'email must be an e-mail address' }));

/** A new password before the shared rule (which needs the account's e-mail) is checked on the server. */
export const newPasswordSchema = z
  .string()
  .min(1, 'password is required')
  .max(1024, 'password is at most 1024 characters');

/** What an admin may change on a user; `quotaBytes: null` means no limit. */
export const updateUserSchema = z
  .strictObject({
    role: z.enum(ROLES).optional(),
    disabled: z.boolean().optional(),
    name: personNameSchema.optional(),
    quotaBytes: z
      .number()
      .int('quotaBytes must be a whole number of bytes')
      .min(0, 'quotaBytes must not be negative')
      .max(Number.MAX_SAFE_INTEGER)
      .nullable()
      .optional(),
  })
  .refine((body) => Object.keys(body).length > 0, { message: 'give at least one of role, disabled, name, quotaBytes' });
export type UpdateUserBody = z.infer<typeof updateUserSchema>;
