import { z } from 'zod';

export const signInSchema = z.strictObject({
  email: z
    .string()
    .trim()
    .toLowerCase()
    .pipe(z.email({ message: 'email must be an e-mail address' })),
  password: z.string().min(1, 'password is required').max(1024),
});
export type SignInBody = z.infer<typeof signInSchema>;
