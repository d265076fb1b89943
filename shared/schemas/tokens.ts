import { z } from 'zod';
import { listQuerySchema } from './list-query';

/** `POST /api/tokens`: a name that says where the token is used, e.g. the training machine. */
export const tokenBodySchema = z.strictObject({
  name: z.string().trim().min(1, 'name is required').max(100, 'name must be at most 100 characters'),
});
export type TokenBody = z.infer<typeof tokenBodySchema>;

export const TOKEN_SORT_FIELDS = ['createdAt', 'name', 'lastUsedAt'] as const;

/** `GET /api/tokens`: the signed-in person's own tokens, newest first unless asked otherwise. */
export const tokenListQuerySchema = listQuerySchema(TOKEN_SORT_FIELDS);
export type TokenListQuery = z.infer<typeof tokenListQuerySchema>;

/** `GET /api/admin/tokens`: every person's tokens, for an admin to see and revoke; `userId` narrows to one owner. */
export const allTokensQuerySchema = listQuerySchema(TOKEN_SORT_FIELDS).extend({
  userId: z.coerce.number().int().positive().optional(),
});
export type AllTokensQuery = z.infer<typeof allTokensQuerySchema>;
