import type { ResetLinkSent, UserSummary } from '../../shared/api-types';
import type { UpdateUserBody } from '../../shared/schemas/people';
import { http } from './http';

export const updateUser = (id: number, body: UpdateUserBody) => http.patch<UserSummary>(`/users/${id}`, body);

export const sendResetLink = (id: number) => http.post<ResetLinkSent>(`/users/${id}/password-reset`);
