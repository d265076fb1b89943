import type { ListPage } from '../../shared/api-types';
import type { PairsetDefinition, PairsetListQuery, PairsetPreviewBody } from '../../shared/schemas/pairsets';
import type { PairsetDetail, PairsetDifficulty, PairsetPreview, PairsetSummary } from '../../shared/types/pairsets';
import { apiErrorFrom, http } from './http';

export const listPairsets = (query: Partial<PairsetListQuery>) =>
  http.get<ListPage<PairsetSummary>>('/pairsets', query);
export const getPairset = (id: number) => http.get<PairsetDetail>(`/pairsets/${id}`);
export const previewPairset = (body: PairsetPreviewBody) => http.post<PairsetPreview>('/pairsets/preview', body);
export const createPairset = (body: PairsetDefinition) => http.post<PairsetDetail>('/pairsets', body);
export const buildPairset = (id: number) => http.post<PairsetDetail>(`/pairsets/${id}/build`);
export const cancelPairsetBuild = (id: number) => http.post<PairsetDetail>(`/pairsets/${id}/cancel`);
export const newPairsetVersion = (id: number) => http.post<PairsetDetail>(`/pairsets/${id}/new-version`);
export const removePairset = (id: number) => http.delete<void>(`/pairsets/${id}`);
export const getPairsetDifficulty = (id: number) => http.get<PairsetDifficulty>(`/pairsets/${id}/difficulty`);

export const pairsetUrls = {
  manifest: (id: number) => `/api/pairsets/${id}/manifest`,
  shard: (id: number, index: number) => `/api/pairsets/${id}/shards/${index}`,
};

/**
 * Downloads a file of a pairset with progress (bytes received of the Content-Length), as a Blob for saving.
 * `signal` cancels it.
 */
export async function downloadPairsetFile(
  url: string,
  onProgress: (received: number, total: number) => void,
  signal?: AbortSignal,
): Promise<Blob> {
  const response = await fetch(url, { credentials: 'same-origin', signal });
  if (!response.ok || !response.body) {
    throw apiErrorFrom(response.status, response.statusText, await response.json().catch(() => null));
  }
  const total = Number(response.headers.get('Content-Length') ?? 0);
  const reader = response.body.getReader();
  const chunks: Uint8Array[] = [];
  let received = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    chunks.push(value);
    received += value.byteLength;
    onProgress(received, total);
  }
  return new Blob(chunks as BlobPart[], { type: response.headers.get('Content-Type') ?? 'application/octet-stream' });
}
