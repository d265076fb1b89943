import { z } from 'zod';
import { pathNumber } from './path-number';

/** `/:id` in a path: a positive whole number. */
export const idParamSchema = z.strictObject({ id: pathNumber('id', { min: 1 }) });
export type IdParam = z.infer<typeof idParamSchema>;

/** `/:uploadId` of a resumable upload: the UUID the server gave it. */
export const uploadIdParamSchema = z.strictObject({ uploadId: z.uuid('uploadId must be the id the server gave') });
