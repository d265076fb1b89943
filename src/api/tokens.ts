import type { ListPage } from '../../shared/api-types';
import type { TokenListQuery } from '../../shared/schemas/tokens';
import type { ApiTokenSummary, CreatedApiToken } from '../../shared/types/pairsets';
import { http } from './http';

export const listApiTokens = (query: Partial<TokenListQuery>) => http.get<ListPage<ApiTokenSummary>>('/tokens', query);
export const createApiToken = (name: string) => http.post<CreatedApiToken>('/tokens', { name });
export const revokeApiToken = (id: number) => http.delete<ApiTokenSummary>(`/tokens/${id}`);
