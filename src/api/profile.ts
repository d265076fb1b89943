import type { Me, StorageUse } from '../../shared/api-types';
import type { ChangePasswordBody, UpdateProfileBody } from '../../shared/schemas/profile';
import { http } from './http';

export const fetchStorageUse = () => http.get<StorageUse>('/me/storage');

export const updateProfile = (body: UpdateProfileBody) => http.patch<Me>('/me', body);

export const changePassword = (body: ChangePasswordBody) => http.post<void>('/me/password', body);
