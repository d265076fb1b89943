import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  bulkBodySchema,
  noQuerySchema,
  rejectReasonsBodySchema,
  reviewQueueQuerySchema,
  verdictBodySchema,
  type BulkBody,
  type RejectReasonsBody,
  type ReviewQueueQuery,
  type VerdictBody,
} from '../../shared/schemas/review';
import {
  compareParamSchema,
  reviewNextQuerySchema,
  undoVerdictBodySchema,
  type CompareParam,
  type ReviewNextQuery,
  type UndoVerdictBody,
} from '../../shared/schemas/review-flow';
import type { ClipDetail } from '../../shared/types/clips';
import type { DuplicateComparison } from '../../shared/types/duplicate-comparison';
import type {
  BulkResponse,
  ClipClaim,
  RejectReasonList,
  ReviewFacets,
  ReviewQueueItem,
} from '../../shared/types/review';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { bulkDecide } from '../core/review/review-bulk';
import { claimClip, releaseClaim } from '../core/review/review-claims';
import { listReviewQueue, reviewFacets } from '../core/review/review-queue';
import { listRejectReasons, replaceRejectReasons } from '../core/review/review-reasons';
import { decideClip } from '../core/review/review-verdicts';
import { compareClips } from '../core/clips/clip-compare';
import { clipsAfter } from '../core/review/review-next';
import { undoVerdict } from '../core/review/review-undo';

/** The shared schemas name no type for an empty query; this one follows the schema. */
type NoQuery = z.output<typeof noQuerySchema>;

/** Under /api/review: the queue, its filter lists and bulk decisions. Curators (and admins). */
export function createReviewRouter(): Router {
  const router = Router();
  router.get('/queue', requireRole('curator'), validated({ query: reviewQueueQuerySchema }, getQueue));
  router.get('/queue/next', requireRole('curator'), validated({ query: reviewNextQuerySchema }, getNext));
  router.get('/facets', requireRole('curator'), validated({ query: noQuerySchema }, getFacets));
  router.post('/bulk', requireRole('curator'), validated({ body: bulkBodySchema }, postBulk));
  return router;
}

/** Under /api/clips: claiming a clip for review, deciding it, undoing that, and comparing it with a near-duplicate. */
export function createClipReviewRouter(): Router {
  const router = Router();
  const byId = { params: idParamSchema };
  router.post('/:id/claim', requireRole('curator'), validated(byId, postClaim));
  router.delete('/:id/claim', requireRole('curator'), validated(byId, deleteClaim));
  router.post(
    '/:id/verdict',
    requireRole('curator'),
    validated({ params: idParamSchema, body: verdictBodySchema }, postVerdict),
  );
  router.post(
    '/:id/verdict/undo',
    requireRole('curator'),
    validated({ params: idParamSchema, body: undoVerdictBodySchema }, postUndo),
  );
  router.get('/:id/compare/:otherId', requireRole('curator'), validated({ params: compareParamSchema }, getCompare));
  return router;
}

/** Under /api/settings: the reject-reasons list; everyone signed in reads it, admins replace it. */
export function createReviewSettingsRouter(): Router {
  const router = Router();
  router.get('/reject-reasons', requireSignIn, validated({ query: noQuerySchema }, getReasons));
  router.put('/reject-reasons', requireRole('admin'), validated({ body: rejectReasonsBodySchema }, putReasons));
  return router;
}

async function getQueue(
  { query }: { query: ReviewQueueQuery },
  _req: Request,
  res: Response<ListPage<ReviewQueueItem>>,
): Promise<void> {
  res.json(await listReviewQueue(query));
}

async function getNext(
  { query }: { query: ReviewNextQuery },
  req: Request,
  res: Response<{ items: ReviewQueueItem[] }>,
): Promise<void> {
  res.json({ items: await clipsAfter(query, currentUser(req)) });
}

async function getFacets(_input: { query: NoQuery }, _req: Request, res: Response<ReviewFacets>): Promise<void> {
  res.json(await reviewFacets());
}

async function postBulk({ body }: { body: BulkBody }, req: Request, res: Response<BulkResponse>): Promise<void> {
  res.json(await bulkDecide(body, currentUser(req)));
}

async function postClaim({ params }: { params: IdParam }, req: Request, res: Response<ClipClaim>): Promise<void> {
  res.json(await claimClip(params.id, currentUser(req)));
}

async function deleteClaim({ params }: { params: IdParam }, req: Request, res: Response): Promise<void> {
  await releaseClaim(params.id, currentUser(req));
  res.status(HttpStatus.NO_CONTENT).end();
}

async function postVerdict(
  { params, body }: { params: IdParam; body: VerdictBody },
  req: Request,
  res: Response<ClipDetail>,
): Promise<void> {
  res.json(await decideClip(params.id, body, currentUser(req)));
}

async function postUndo(
  { params, body }: { params: IdParam; body: UndoVerdictBody },
  req: Request,
  res: Response<ClipDetail>,
): Promise<void> {
  res.json(await undoVerdict(params.id, body, currentUser(req)));
}

async function getCompare({ params }: { params: CompareParam }, _req: Request, res: Response<DuplicateComparison>) {
  res.json(await compareClips(params.id, params.otherId));
}

async function getReasons(_input: { query: NoQuery }, _req: Request, res: Response<RejectReasonList>): Promise<void> {
  res.json(await listRejectReasons());
}

async function putReasons(
  { body }: { body: RejectReasonsBody },
  req: Request,
  res: Response<RejectReasonList>,
): Promise<void> {
  res.json(await replaceRejectReasons(body, currentUser(req).id));
}
