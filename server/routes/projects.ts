import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  projectBodySchema,
  projectListQuerySchema,
  projectPatchSchema,
  type ProjectBody,
  type ProjectListQuery,
  type ProjectPatch,
} from '../../shared/schemas/projects';
import type { ProjectSummary } from '../../shared/types/projects';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { createProject, getProject, listProjects, updateProject } from '../core/projects/projects';

export const projectsRouter = Router();

projectsRouter.get('/', requireSignIn, validated({ query: projectListQuerySchema }, getProjects));
projectsRouter.get('/:id', requireSignIn, validated({ params: idParamSchema }, getOneProject));
projectsRouter.post('/', requireRole('admin'), validated({ body: projectBodySchema }, postProject));
projectsRouter.patch(
  '/:id',
  requireRole('admin'),
  validated({ params: idParamSchema, body: projectPatchSchema }, patchProject),
);

async function getProjects(
  { query }: { query: ProjectListQuery },
  _req: Request,
  res: Response<ListPage<ProjectSummary>>,
): Promise<void> {
  res.json(await listProjects(query));
}

async function getOneProject(
  { params }: { params: IdParam },
  _req: Request,
  res: Response<ProjectSummary>,
): Promise<void> {
  res.json(await getProject(params.id));
}

async function postProject(
  { body }: { body: ProjectBody },
  req: Request,
  res: Response<ProjectSummary>,
): Promise<void> {
  res.status(HttpStatus.CREATED).json(await createProject(body, currentUser(req).id));
}

async function patchProject(
  { params, body }: { params: IdParam; body: ProjectPatch },
  req: Request,
  res: Response<ProjectSummary>,
): Promise<void> {
  res.json(await updateProject(params.id, body, currentUser(req).id));
}
