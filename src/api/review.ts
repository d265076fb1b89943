import type { ListPage } from '../../shared/api-types';
import type { RejectReason } from '../../shared/review/reject-reasons';
import type { BulkBodyInput, ReviewQueueQuery, VerdictBody } from '../../shared/schemas/review';
import type { ReviewNextQuery } from '../../shared/schemas/review-flow';
import type { ClipDetail } from '../../shared/types/clips';
import type { DuplicateComparison } from '../../shared/types/duplicate-comparison';
import type {
  BulkResponse,
  ClipClaim,
  RejectReasonList,
  ReviewFacets,
  ReviewQueueItem,
} from '../../shared/types/review';
import { http } from './http';

/** The queue's parameters as they sit in the URL: every value a string, as the server reads a query string. */
export type QueueQueryParams = Partial<Record<keyof ReviewQueueQuery, string>>;

export const listReviewQueue = (query: QueueQueryParams) => http.get<ListPage<ReviewQueueItem>>('/review/queue', query);
/** The clips after `after` in the queue, under the queue's filter and sort (no paging). */
export const listReviewNext = (query: Partial<Record<keyof ReviewNextQuery, string>>) =>
  http.get<{ items: ReviewQueueItem[] }>('/review/queue/next', query);
export const getReviewFacets = () => http.get<ReviewFacets>('/review/facets');
export const claimClip = (clipId: number) => http.post<ClipClaim>(`/clips/${clipId}/claim`);
export const releaseClaim = (clipId: number) => http.delete<void>(`/clips/${clipId}/claim`);
export const decideClip = (clipId: number, body: VerdictBody) =>
  http.post<ClipDetail>(`/clips/${clipId}/verdict`, body);
export const undoVerdict = (clipId: number, verdictId: number) =>
  http.post<ClipDetail>(`/clips/${clipId}/verdict/undo`, { verdictId });
export const compareClips = (clipId: number, otherId: number) =>
  http.get<DuplicateComparison>(`/clips/${clipId}/compare/${otherId}`);
export const bulkDecide = (body: BulkBodyInput) => http.post<BulkResponse>('/review/bulk', body);
export const getRejectReasons = () => http.get<RejectReasonList>('/settings/reject-reasons');
export const putRejectReasons = (reasons: RejectReason[]) =>
  http.put<RejectReasonList>('/settings/reject-reasons', { reasons });
