import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  pairsetDefinitionSchema,
  pairsetListQuerySchema,
  pairsetPreviewSchema,
  shardParamSchema,
  type PairsetDefinition,
  type PairsetListQuery,
  type PairsetPreviewBody,
  type ShardParam,
} from '../../shared/schemas/pairsets';
import type { PairsetDetail, PairsetDifficulty, PairsetPreview, PairsetSummary } from '../../shared/types/pairsets';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import {
  cancelBuild,
  createPairset,
  deletePairset,
  getPairsetDetail,
  listPairsets,
  manifestObject,
  newPairsetVersion,
  pairsetDifficulty,
  previewPairset,
  shardFile,
  startBuild,
} from '../core/pairsets/pairsets';
import type { ObjectStore } from '../core/storage/object-store';
import { sendStored } from './send-stored';

/** Pairsets under /api/pairsets, for engineers (admins pass). Reads and downloads also take an API token. */
export function createPairsetsRouter(store: ObjectStore): Router {
  const router = Router();
  const engineer = requireRole('engineer');
  const byId = { params: idParamSchema };
  router.post('/', engineer, validated({ body: pairsetDefinitionSchema }, postPairset));
  router.post('/preview', engineer, validated({ body: pairsetPreviewSchema }, postPreview));
  router.get('/', engineer, validated({ query: pairsetListQuerySchema }, getPairsets));
  router.get('/:id', engineer, validated(byId, getPairset));
  router.post('/:id/build', engineer, validated(byId, postBuild));
  router.post('/:id/cancel', engineer, validated(byId, postCancel));
  router.post('/:id/new-version', engineer, validated(byId, postNewVersion));
  router.delete('/:id', engineer, validated(byId, removePairset(store)));
  router.get('/:id/manifest', engineer, validated(byId, getManifest(store)));
  router.get('/:id/shards/:index', engineer, validated({ params: shardParamSchema }, getShard(store)));
  router.get('/:id/difficulty', engineer, validated(byId, getDifficulty));
  return router;
}

async function postPairset(
  { body }: { body: PairsetDefinition },
  req: Request,
  res: Response<PairsetDetail>,
): Promise<void> {
  const created = await createPairset(body, currentUser(req).id);
  res.status(HttpStatus.CREATED).json(created);
}

async function postPreview(
  { body }: { body: PairsetPreviewBody },
  _req: Request,
  res: Response<PairsetPreview>,
): Promise<void> {
  res.json(await previewPairset(body));
}

async function getPairsets(
  { query }: { query: PairsetListQuery },
  _req: Request,
  res: Response<ListPage<PairsetSummary>>,
): Promise<void> {
  res.json(await listPairsets(query));
}

async function getPairset({ params }: { params: IdParam }, _req: Request, res: Response<PairsetDetail>): Promise<void> {
  res.json(await getPairsetDetail(params.id));
}

async function postBuild({ params }: { params: IdParam }, req: Request, res: Response<PairsetDetail>): Promise<void> {
  res.status(HttpStatus.ACCEPTED).json(await startBuild(params.id, currentUser(req)));
}

async function postCancel({ params }: { params: IdParam }, req: Request, res: Response<PairsetDetail>): Promise<void> {
  res.json(await cancelBuild(params.id, currentUser(req)));
}

async function postNewVersion(
  { params }: { params: IdParam },
  req: Request,
  res: Response<PairsetDetail>,
): Promise<void> {
  const created = await newPairsetVersion(params.id, currentUser(req).id);
  res.status(HttpStatus.CREATED).json(created);
}

function removePairset(store: ObjectStore) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response) => {
    await deletePairset(params.id, currentUser(req), store);
    res.status(HttpStatus.NO_CONTENT).end();
  };
}

/** Built files never change, so they may be cached; a Range is answered 206 (resumable downloads). */
function getManifest(store: ObjectStore) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response) => {
    await sendStored(req, res, store, await manifestObject(params.id), { 'Content-Type': 'application/json' });
  };
}

function getShard(store: ObjectStore) {
  return async ({ params }: { params: ShardParam }, req: Request, res: Response) => {
    const { id, index } = params;
    const shard = await shardFile(id, index);
    res.attachment(shard.file);
    await sendStored(req, res, store, shard, { 'Content-Type': 'application/x-tar' });
  };
}

async function getDifficulty(
  { params }: { params: IdParam },
  _req: Request,
  res: Response<PairsetDifficulty>,
): Promise<void> {
  res.json(await pairsetDifficulty(params.id));
}
