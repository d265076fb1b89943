import { z } from 'zod';

/** The code in an invitation or reset link: 32 random bytes in base64url, so 43 characters. */
export const oneTimeTokenSchema = z
  .string()
  .regex(/^[A-Za-z0-9_-]{43}$/, 'token must be the 43-character code from the link');
