import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  projectBodySchema, projectListQuerySchema, projectPatchSchema, type ProjectBody, type ProjectListQuery,
  type ProjectPatch,
} from '../../shared/schemas/projects';
import type { ProjectSummary } from '../../shared/types/projects';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { createProject, getProject, listProjects, updateProject } from '../core/projects/projects';

export const projectsRouter = Router();

projectsRouter.get('/', requireSignIn, validate({ query: projectListQuerySchema }), getProjects);
projectsRouter.get('/:id', requireSignIn, validate({ params: idParamSchema }), getOneProject);
projectsRouter.post('/', requireRole('admin'), validate({ body: projectBodySchema }), postProject);
projectsRouter.patch('/:id', requireRole('admin'), validate({ params: idParamSchema, body: projectPatchSchema }), patchProject);

async function getProjects(req: Request, res: Response<ListPage<ProjectSummary>>): Promise<void> {
  res.json(await listProjects(req.valid.query as ProjectListQuery));
}

async function getOneProject(req: Request, res: Response<ProjectSummary>): Promise<void> {
  res.json(await getProject((req.valid.params as IdParam).id));
}

async function postProject(req: Request, res: Response<ProjectSummary>): Promise<void> {
  res.status(HttpStatus.CREATED).json(await createProject(req.valid.body as ProjectBody, currentUser(req).id));
}

async function patchProject(req: Request, res: Response<ProjectSummary>): Promise<void> {
  const { id } = req.valid.params as IdParam;
  res.json(await updateProject(id, req.valid.body as ProjectPatch, currentUser(req).id));
}
