import type { ListPage } from '../../shared/api-types';
import type { Settings } from '../../shared/schemas/settings';
import type { AuditListQuery, JobListQuery } from '../../shared/schemas/admin';
import type {
  AuditEntry,
  JobSummary,
  PublicAddress,
  RetentionPreview,
  UsageReport,
  WorkerSummary,
} from '../../shared/types/admin';
import { http } from './http';

export const getUsage = () => http.get<UsageReport>('/admin/usage');
export const requestReconcile = () => http.post<{ jobId: number }>('/admin/reconcile');
export const listJobs = (query: Partial<JobListQuery>) => http.get<ListPage<JobSummary>>('/jobs', query);
export const retryJob = (id: number) => http.post<JobSummary>(`/jobs/${id}/retry`);
export const cancelJob = (id: number) => http.post<JobSummary>(`/jobs/${id}/cancel`);
export const listWorkers = () => http.get<WorkerSummary[]>('/jobs/workers');
export const listAudit = (query: Partial<AuditListQuery>) => http.get<ListPage<AuditEntry>>('/audit', query);

/** The CSV export's address with the same filters as the screen (downloaded by the browser itself). */
export function auditCsvUrl(filters: Record<string, string | number | undefined>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(filters))
    if (value !== undefined && value !== '') params.set(key, String(value));
  const search = params.toString();
  return `/api/audit.csv${search ? `?${search}` : ''}`;
}

export const previewRetention = (projectId: number) =>
  http.get<RetentionPreview>('/admin/retention/preview', { projectId });
export const runRetention = (projectId: number) => http.post<{ jobId: number }>('/admin/retention/run', { projectId });

export const getSettings = () => http.get<Settings>('/settings');
export const putSettings = (settings: Settings) => http.put<Settings>('/settings', settings);
export const getPublicAddress = () => http.get<PublicAddress>('/settings/public-url');
