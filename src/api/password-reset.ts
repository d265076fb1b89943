import type { Notice } from '../../shared/api-types';
import type { ResetPasswordBody, ResetRequestBody } from '../../shared/schemas/password-reset';
import { http } from './http';

export const requestPasswordReset = (body: ResetRequestBody) => http.post<Notice>('/auth/reset-request', body);

export const resetPassword = (body: ResetPasswordBody) => http.post<void>('/auth/reset', body);
