import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { jobListQuerySchema, type JobListQuery } from '../../shared/schemas/admin';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { JobSummary } from '../../shared/types/admin';
import { currentUser, requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { cancelJob, listJobs, retryJob } from '../core/jobs/jobs-admin';

export const jobsRouter = Router();

jobsRouter.get('/', requireRole('admin'), validate({ query: jobListQuerySchema }), getJobs);
jobsRouter.post('/:id/retry', requireRole('admin'), validate({ params: idParamSchema }), postRetry);
jobsRouter.post('/:id/cancel', requireRole('admin'), validate({ params: idParamSchema }), postCancel);

async function getJobs(req: Request, res: Response<ListPage<JobSummary>>): Promise<void> {
  res.json(await listJobs(req.valid.query as JobListQuery));
}

async function postRetry(req: Request, res: Response<JobSummary>): Promise<void> {
  res.json(await retryJob((req.valid.params as IdParam).id, currentUser(req).id));
}

async function postCancel(req: Request, res: Response<JobSummary>): Promise<void> {
  res.json(await cancelJob((req.valid.params as IdParam).id, currentUser(req).id));
}
