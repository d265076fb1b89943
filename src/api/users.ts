import type { ListPage, UserSummary } from '../../shared/api-types';
import type { UserListQuery } from '../../shared/schemas/users';
import { http } from './http';

export const listUsers = (query: Partial<UserListQuery>) => http.get<ListPage<UserSummary>>('/users', query);
