import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { jobListQuerySchema, type JobListQuery } from '../../shared/schemas/admin';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { JobSummary, WorkerSummary } from '../../shared/types/admin';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { cancelJob, listJobs, retryJob } from '../core/jobs/jobs-admin';
import { listWorkers } from '../core/jobs/worker-presence';

export const jobsRouter = Router();

jobsRouter.get('/', requireRole('admin'), validated({ query: jobListQuerySchema }, getJobs));
jobsRouter.get('/workers', requireRole('admin'), validated({}, getWorkers));
jobsRouter.post('/:id/retry', requireRole('admin'), validated({ params: idParamSchema }, postRetry));
jobsRouter.post('/:id/cancel', requireRole('admin'), validated({ params: idParamSchema }, postCancel));

async function getJobs(
  { query }: { query: JobListQuery },
  _req: Request,
  res: Response<ListPage<JobSummary>>,
): Promise<void> {
  res.json(await listJobs(query));
}

async function getWorkers(_input: object, _req: Request, res: Response<WorkerSummary[]>): Promise<void> {
  res.json(await listWorkers());
}

async function postRetry({ params }: { params: IdParam }, req: Request, res: Response<JobSummary>): Promise<void> {
  res.json(await retryJob(params.id, currentUser(req).id));
}

async function postCancel({ params }: { params: IdParam }, req: Request, res: Response<JobSummary>): Promise<void> {
  res.json(await cancelJob(params.id, currentUser(req).id));
}
