import type { ListPage } from '../../shared/api-types';
import type { AllTokensQuery, TokenListQuery } from '../../shared/schemas/tokens';
import type { ApiTokenSummary, CreatedApiToken, OwnedApiTokenSummary } from '../../shared/types/pairsets';
import { http } from './http';

export const listApiTokens = (query: Partial<TokenListQuery>) => http.get<ListPage<ApiTokenSummary>>('/tokens', query);
export const createApiToken = (name: string) => http.post<CreatedApiToken>('/tokens', { name });
export const revokeApiToken = (id: number) => http.delete<ApiTokenSummary>(`/tokens/${id}`);
/** Admins: every person's tokens with their owners; revoking goes through `revokeApiToken` as for one's own. */
export const listAllApiTokens = (query: Partial<AllTokensQuery>) =>
  http.get<ListPage<OwnedApiTokenSummary>>('/admin/tokens', query);
