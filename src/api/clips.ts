import type { ApiErrorBody, ListPage } from '../../shared/api-types';
import type { ClipListQuery, ClipPatch } from '../../shared/schemas/clips';
import type { ClipDetail, ClipSummary } from '../../shared/types/clips';
import { apiErrorFrom, fetchCsrfToken, http } from './http';

export const listClips = (query: Partial<ClipListQuery>) => http.get<ListPage<ClipSummary>>('/clips', query);
export const getClip = (id: number) => http.get<ClipDetail>(`/clips/${id}`);
export const updateClip = (id: number, patch: ClipPatch) => http.patch<ClipDetail>(`/clips/${id}`, patch);
export const removeClip = (id: number) => http.delete<void>(`/clips/${id}`);
export const clipSourceUrl = (id: number) => `/api/clips/${id}/source`;

export interface UploadHandle {
  done: Promise<ClipSummary>;
  cancel(): void;
}

/**
 * Sends one file as `POST /api/clips` with the metadata fields first (the server reserves quota before reading
 * the file). XMLHttpRequest rather than fetch, because only it reports upload progress.
 */
export function uploadClip(
  fields: Record<string, string>,
  file: File,
  onProgress: (sentBytes: number, totalBytes: number) => void,
): UploadHandle {
  const xhr = new XMLHttpRequest();
  const done = fetchCsrfToken().then(
    (token) =>
      new Promise<ClipSummary>((resolve, reject) => {
        const form = new FormData();
        for (const [key, value] of Object.entries(fields)) form.append(key, value);
        form.append('file', file, file.name);
        xhr.open('POST', '/api/clips');
        xhr.setRequestHeader('x-csrf-token', token);
        xhr.responseType = 'json';
        xhr.upload.onprogress = (event) => onProgress(event.loaded, event.total);
        xhr.onload = () => {
          if (xhr.status === 201) resolve(xhr.response as ClipSummary);
          else reject(apiErrorFrom(xhr.status, xhr.statusText, xhr.response as ApiErrorBody | null));
        };
        xhr.onerror = () => reject(new Error('The connection to the server broke off.'));
        xhr.onabort = () => reject(new DOMException('Upload cancelled', 'AbortError'));
        xhr.send(form);
      }),
  );
  return { done, cancel: () => xhr.abort() };
}
