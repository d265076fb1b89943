import type { ListPage } from '../../shared/api-types';
import type { ProjectBody, ProjectListQuery, ProjectPatch } from '../../shared/schemas/projects';
import type { ProjectSummary } from '../../shared/types/projects';
import { http } from './http';

export const listProjects = (query: Partial<ProjectListQuery> = {}) =>
  http.get<ListPage<ProjectSummary>>('/projects', query);
export const getProject = (id: number) => http.get<ProjectSummary>(`/projects/${id}`);
export const createProject = (body: ProjectBody) => http.post<ProjectSummary>('/projects', body);
export const updateProject = (id: number, patch: ProjectPatch) => http.patch<ProjectSummary>(`/projects/${id}`, patch);
