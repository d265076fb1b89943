import { z } from 'zod';
import { newPasswordSchema, personNameSchema } from './people';

export const updateProfileSchema = z.strictObject({ name: personNameSchema });
export type UpdateProfileBody = z.infer<typeof updateProfileSchema>;

export const changePasswordSchema = z.strictObject({
  currentPassword: z.string().min(1, 'currentPassword is required').max(1024),
  password: newPasswordSchema,
});
export type ChangePasswordBody = z.infer<typeof changePasswordSchema>;
