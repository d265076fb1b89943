import type { ListPage } from '../../shared/api-types';
import type { ClipListQuery, ClipPatch } from '../../shared/schemas/clips';
import type { ClipDetail, ClipSummary } from '../../shared/types/clips';
import { http } from './http';

export const listClips = (query: Partial<ClipListQuery>) => http.get<ListPage<ClipSummary>>('/clips', query);
export const getClip = (id: number) => http.get<ClipDetail>(`/clips/${id}`);
export const updateClip = (id: number, patch: ClipPatch) => http.patch<ClipDetail>(`/clips/${id}`, patch);
export const removeClip = (id: number) => http.delete<void>(`/clips/${id}`);
export const clipSourceUrl = (id: number) => `/api/clips/${id}/source`;

export { uploadClip, type UploadHandle } from './clip-upload';
