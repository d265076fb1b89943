import { z } from 'zod';
import { ROLES } from '../roles';
import { listQuerySchema } from './list-query';

export const USER_SORT_FIELDS = ['email', 'name', 'role', 'createdAt', 'lastSignInAt'] as const;

export const userListQuerySchema = listQuerySchema(USER_SORT_FIELDS).extend({
  search: z.string().trim().max(200).optional(),
  role: z.enum(ROLES).optional(),
});
export type UserListQuery = z.infer<typeof userListQuerySchema>;
