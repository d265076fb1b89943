import type { ClusteringCreateBody } from '../../shared/schemas/diversity';
import type { ClusteringSummary, SimilarClips } from '../../shared/types/diversity';
import { http } from './http';

export const similarClips = (clipId: number) => http.get<SimilarClips>(`/clips/${clipId}/similar`);
export const listClusterings = (projectId?: number) =>
  http.get<ClusteringSummary[]>('/clusterings', projectId ? { projectId: String(projectId) } : {});
export const createClustering = (body: Partial<ClusteringCreateBody> & Pick<ClusteringCreateBody, 'projectIds'>) =>
  http.post<ClusteringSummary>('/clusterings', body);
export const getClustering = (id: number) => http.get<ClusteringSummary>(`/clusterings/${id}`);
