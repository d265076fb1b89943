import { z } from 'zod';

export const MAX_PAGE_SIZE = 200;
export const DEFAULT_PAGE_SIZE = 50;

/**
 * Paging and sorting shared by every list endpoint (DESIGN §8): `page` from 1, `pageSize` up to 200,
 * `sort` as `field` or `-field` where field is one of `sortable`.
 */
export function listQuerySchema<const F extends readonly [string, ...string[]]>(sortable: F) {
  const sortValues = sortable.flatMap((field) => [field, `-${field}`]) as [string, ...string[]];
  return z.strictObject({
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(MAX_PAGE_SIZE).default(DEFAULT_PAGE_SIZE),
    sort: z.enum(sortValues).optional(),
  });
}
