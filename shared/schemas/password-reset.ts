import { z } from 'zod';
import { oneTimeTokenSchema } from './one-time-token';
import { emailSchema, newPasswordSchema } from './people';

export const resetRequestSchema = z.strictObject({ email: emailSchema });
export type ResetRequestBody = z.infer<typeof resetRequestSchema>;

export const resetPasswordSchema = z.strictObject({
  token: oneTimeTokenSchema,
  password: newPasswordSchema,
});
export type ResetPasswordBody = z.infer<typeof resetPasswordSchema>;
