import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  bulkBodySchema, noQuerySchema, rejectReasonsBodySchema, reviewQueueQuerySchema, verdictBodySchema, type BulkBody,
  type RejectReasonsBody, type ReviewQueueQuery, type VerdictBody,
} from '../../shared/schemas/review';
import {
  compareParamSchema, reviewNextQuerySchema, undoVerdictBodySchema, type CompareParam, type ReviewNextQuery,
  type UndoVerdictBody,
} from '../../shared/schemas/review-flow';
import type { DuplicateComparison } from '../../shared/types/duplicate-comparison';
import type { ClipDetail } from '../../shared/types/clips';
import type {
  BulkResponse, ClipClaim, RejectReasonList, ReviewFacets, ReviewQueueItem,
} from '../../shared/types/review';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { compareClips } from '../services/clip-compare';
import { bulkDecide } from '../services/review-bulk';
import { claimClip, releaseClaim } from '../services/review-claims';
import { listReviewQueue, reviewFacets } from '../services/review-queue';
import { listRejectReasons, replaceRejectReasons } from '../services/review-reasons';
import { clipsAfter } from '../services/review-next';
import { undoVerdict } from '../services/review-undo';
import { decideClip } from '../services/review-verdicts';

/** Under /api/review: the queue, its filter lists and bulk decisions. Curators (and admins). */
export function createReviewRouter(): Router {
  const router = Router();
  router.get('/queue', requireRole('curator'), validate({ query: reviewQueueQuerySchema }), getQueue);
  router.get('/queue/next', requireRole('curator'), validate({ query: reviewNextQuerySchema }), getNext);
  router.get('/facets', requireRole('curator'), validate({ query: noQuerySchema }), getFacets);
  router.post('/bulk', requireRole('curator'), validate({ body: bulkBodySchema }), postBulk);
  return router;
}

/** Under /api/clips: claiming a clip for review, deciding it, undoing that, and comparing it with a near-duplicate. */
export function createClipReviewRouter(): Router {
  const router = Router();
  const byId = validate({ params: idParamSchema });
  router.post('/:id/claim', requireRole('curator'), byId, postClaim);
  router.delete('/:id/claim', requireRole('curator'), byId, deleteClaim);
  router.post('/:id/verdict', requireRole('curator'), validate({ params: idParamSchema, body: verdictBodySchema }),
    postVerdict);
  router.post('/:id/verdict/undo', requireRole('curator'),
    validate({ params: idParamSchema, body: undoVerdictBodySchema }), postUndo);
  router.get('/:id/compare/:otherId', requireRole('curator'), validate({ params: compareParamSchema }), getCompare);
  return router;
}

/** Under /api/settings: the reject-reasons list; everyone signed in reads it, admins replace it. */
export function createReviewSettingsRouter(): Router {
  const router = Router();
  router.get('/reject-reasons', requireSignIn, validate({ query: noQuerySchema }), getReasons);
  router.put('/reject-reasons', requireRole('admin'), validate({ body: rejectReasonsBodySchema }), putReasons);
  return router;
}

async function getQueue(req: Request, res: Response<ListPage<ReviewQueueItem>>): Promise<void> {
  res.json(await listReviewQueue(req.valid.query as ReviewQueueQuery));
}

async function getNext(req: Request, res: Response<{ items: ReviewQueueItem[] }>): Promise<void> {
  res.json({ items: await clipsAfter(req.valid.query as ReviewNextQuery, currentUser(req)) });
}

async function getFacets(_req: Request, res: Response<ReviewFacets>): Promise<void> {
  res.json(await reviewFacets());
}

async function postBulk(req: Request, res: Response<BulkResponse>): Promise<void> {
  res.json(await bulkDecide(req.valid.body as BulkBody, currentUser(req)));
}

async function postClaim(req: Request, res: Response<ClipClaim>): Promise<void> {
  res.json(await claimClip((req.valid.params as IdParam).id, currentUser(req)));
}

async function deleteClaim(req: Request, res: Response): Promise<void> {
  await releaseClaim((req.valid.params as IdParam).id, currentUser(req));
  res.status(HttpStatus.NO_CONTENT).end();
}

async function postVerdict(req: Request, res: Response<ClipDetail>): Promise<void> {
  const { id } = req.valid.params as IdParam;
  res.json(await decideClip(id, req.valid.body as VerdictBody, currentUser(req)));
}

async function postUndo(req: Request, res: Response<ClipDetail>): Promise<void> {
  const { id } = req.valid.params as IdParam;
  res.json(await undoVerdict(id, req.valid.body as UndoVerdictBody, currentUser(req)));
}

async function getCompare(req: Request, res: Response<DuplicateComparison>): Promise<void> {
  const { id, otherId } = req.valid.params as CompareParam;
  res.json(await compareClips(id, otherId));
}

async function getReasons(_req: Request, res: Response<RejectReasonList>): Promise<void> {
  res.json(await listRejectReasons());
}

async function putReasons(req: Request, res: Response<RejectReasonList>): Promise<void> {
  res.json(await replaceRejectReasons(req.valid.body as RejectReasonsBody, currentUser(req).id));
}
