import { z } from 'zod';
import { pathNumber } from './path-number';

/** `/:id` in a path: a positive whole number. */
export const idParamSchema = z.strictObject({ id: pathNumber('id', { min: 1 }) });
export type IdParam = z.infer<typeof idParamSchema>;
