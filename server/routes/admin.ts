import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import { HttpStatus } from '../../shared/http-status';
import { retentionQuerySchema, retentionRunSchema, type RetentionQuery } from '../../shared/schemas/admin';
import { allTokensQuerySchema, type AllTokensQuery } from '../../shared/schemas/tokens';
import type { ListPage } from '../../shared/api-types';
import type { RetentionPreview, UsageReport } from '../../shared/types/admin';
import type { OwnedApiTokenSummary } from '../../shared/types/pairsets';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { requestReconcile } from '../core/usage/reconcile-requests';
import { requestRetentionRun, retentionCandidates } from '../core/clips/retention';
import { usageReport } from '../core/usage/usage';
import { listAllApiTokens } from '../core/people/api-tokens';
import type { StoragePaths } from '../core/storage/paths';

export function createAdminRouter(paths: StoragePaths): Router {
  const router = Router();
  router.get('/usage', requireRole('admin'), getUsage(paths));
  router.post('/reconcile', requireRole('admin'), postReconcile);
  router.get(
    '/retention/preview',
    requireRole('admin'),
    validated({ query: retentionQuerySchema }, getRetentionPreview),
  );
  router.post('/retention/run', requireRole('admin'), validated({ body: retentionRunSchema }, postRetentionRun));
  router.get('/tokens', requireRole('admin'), validated({ query: allTokensQuerySchema }, getAllTokens));
  return router;
}

/** Everyone's API tokens; revoking one goes through `DELETE /api/tokens/:id`, which admins may use on any token. */
async function getAllTokens(
  { query }: { query: AllTokensQuery },
  _req: Request,
  res: Response<ListPage<OwnedApiTokenSummary>>,
): Promise<void> {
  res.json(await listAllApiTokens(query));
}

async function getRetentionPreview(
  { query }: { query: RetentionQuery },
  _req: Request,
  res: Response<RetentionPreview>,
): Promise<void> {
  res.json(await retentionCandidates(query.projectId));
}

async function postRetentionRun(
  { body }: { body: z.output<typeof retentionRunSchema> },
  req: Request,
  res: Response<{ jobId: number }>,
): Promise<void> {
  const job = await requestRetentionRun(body.projectId, currentUser(req).id);
  res.status(HttpStatus.ACCEPTED).json({ jobId: job.id });
}

function getUsage(paths: StoragePaths) {
  return async (_req: Request, res: Response<UsageReport>) => {
    res.json(await usageReport(paths));
  };
}

async function postReconcile(req: Request, res: Response<{ jobId: number }>): Promise<void> {
  const job = await requestReconcile('on-demand', currentUser(req).id);
  res.status(HttpStatus.ACCEPTED).json({ jobId: job.id });
}
