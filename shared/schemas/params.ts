import { z } from 'zod';

/** `/:id` in a path: a positive whole number. */
export const idParamSchema = z.strictObject({ id: z.coerce.number().int().positive('id must be a positive number') });
export type IdParam = z.infer<typeof idParamSchema>;
