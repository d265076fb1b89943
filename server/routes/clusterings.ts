import { Router, type Request, type Response } from 'express';
import { HttpStatus } from '../../shared/http-status';
import {
  clusteringCreateSchema,
  clusteringListQuerySchema,
  type ClusteringCreateBody,
  type ClusteringListQuery,
} from '../../shared/schemas/diversity';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { ClusteringSummary, SimilarClips } from '../../shared/types/diversity';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { createClustering, getClustering, listClusterings, similarClips } from '../core/diversity/clusterings';

/** Clusterings of moments under /api/clusterings, for engineers (admins pass); the worker runs them. */
export function createClusteringsRouter(): Router {
  const router = Router();
  const engineer = requireRole('engineer');
  router.post('/', engineer, validated({ body: clusteringCreateSchema }, postClustering));
  router.get('/', engineer, validated({ query: clusteringListQuerySchema }, getClusterings));
  router.get('/:id', engineer, validated({ params: idParamSchema }, getOne));
  return router;
}

/** `GET /api/clips/:id/similar`: for everyone signed in, beside the clip's frames. */
export function createSimilarClipsRouter(): Router {
  const router = Router();
  router.get('/:id/similar', requireSignIn, validated({ params: idParamSchema }, getSimilar));
  return router;
}

async function postClustering(
  { body }: { body: ClusteringCreateBody },
  req: Request,
  res: Response<ClusteringSummary>,
): Promise<void> {
  res.status(HttpStatus.ACCEPTED).json(await createClustering(body, currentUser(req).id));
}

async function getClusterings(
  { query }: { query: ClusteringListQuery },
  _req: Request,
  res: Response<ClusteringSummary[]>,
): Promise<void> {
  res.json(await listClusterings(query));
}

async function getOne({ params }: { params: IdParam }, _req: Request, res: Response<ClusteringSummary>): Promise<void> {
  res.json(await getClustering(params.id));
}

async function getSimilar({ params }: { params: IdParam }, _req: Request, res: Response<SimilarClips>): Promise<void> {
  res.json(await similarClips(params.id));
}
