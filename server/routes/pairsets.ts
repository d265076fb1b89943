import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  pairsetDefinitionSchema, pairsetListQuerySchema, pairsetPreviewSchema, shardParamSchema, type PairsetDefinition,
  type PairsetListQuery, type PairsetPreviewBody, type ShardParam,
} from '../../shared/schemas/pairsets';
import type {
  PairsetDetail, PairsetDifficulty, PairsetPreview, PairsetSummary,
} from '../../shared/types/pairsets';
import { currentUser, requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import {
  cancelBuild, createPairset, deletePairset, getPairsetDetail, listPairsets, manifestPath, newPairsetVersion,
  pairsetDifficulty, previewPairset, shardFile, startBuild,
} from '../core/pairsets/pairsets';
import type { StoragePaths } from '../core/storage/paths';

/** Pairsets under /api/pairsets, for engineers (admins pass). Reads and downloads also take an API token. */
export function createPairsetsRouter(paths: StoragePaths): Router {
  const router = Router();
  const engineer = requireRole('engineer');
  const byId = validate({ params: idParamSchema });
  router.post('/', engineer, validate({ body: pairsetDefinitionSchema }), postPairset);
  router.post('/preview', engineer, validate({ body: pairsetPreviewSchema }), postPreview);
  router.get('/', engineer, validate({ query: pairsetListQuerySchema }), getPairsets);
  router.get('/:id', engineer, byId, getPairset);
  router.post('/:id/build', engineer, byId, postBuild);
  router.post('/:id/cancel', engineer, byId, postCancel);
  router.post('/:id/new-version', engineer, byId, postNewVersion);
  router.delete('/:id', engineer, byId, removePairset(paths));
  router.get('/:id/manifest', engineer, byId, getManifest(paths));
  router.get('/:id/shards/:index', engineer, validate({ params: shardParamSchema }), getShard(paths));
  router.get('/:id/difficulty', engineer, byId, getDifficulty);
  return router;
}

async function postPairset(req: Request, res: Response<PairsetDetail>): Promise<void> {
  const created = await createPairset(req.valid.body as PairsetDefinition, currentUser(req).id);
  res.status(HttpStatus.CREATED).json(created);
}

async function postPreview(req: Request, res: Response<PairsetPreview>): Promise<void> {
  res.json(await previewPairset(req.valid.body as PairsetPreviewBody));
}

async function getPairsets(req: Request, res: Response<ListPage<PairsetSummary>>): Promise<void> {
  res.json(await listPairsets(req.valid.query as PairsetListQuery));
}

async function getPairset(req: Request, res: Response<PairsetDetail>): Promise<void> {
  res.json(await getPairsetDetail((req.valid.params as IdParam).id));
}

async function postBuild(req: Request, res: Response<PairsetDetail>): Promise<void> {
  res.status(HttpStatus.ACCEPTED).json(await startBuild((req.valid.params as IdParam).id, currentUser(req)));
}

async function postCancel(req: Request, res: Response<PairsetDetail>): Promise<void> {
  res.json(await cancelBuild((req.valid.params as IdParam).id, currentUser(req)));
}

async function postNewVersion(req: Request, res: Response<PairsetDetail>): Promise<void> {
  const created = await newPairsetVersion((req.valid.params as IdParam).id, currentUser(req).id);
  res.status(HttpStatus.CREATED).json(created);
}

function removePairset(paths: StoragePaths) {
  return async (req: Request, res: Response) => {
    await deletePairset((req.valid.params as IdParam).id, currentUser(req), paths);
    res.status(HttpStatus.NO_CONTENT).end();
  };
}

/** Built files never change, so they may be cached; sendFile answers a Range with 206 (resumable downloads). */
function getManifest(paths: StoragePaths) {
  return async (req: Request, res: Response) => {
    const file = await manifestPath((req.valid.params as IdParam).id, paths);
    res.sendFile(file, { acceptRanges: true, dotfiles: 'deny', headers: { 'Content-Type': 'application/json' } });
  };
}

function getShard(paths: StoragePaths) {
  return async (req: Request, res: Response) => {
    const { id, index } = req.valid.params as ShardParam;
    const shard = await shardFile(id, index, paths);
    res.attachment(shard.file);
    res.sendFile(shard.path, {
      acceptRanges: true, dotfiles: 'deny', headers: { 'Content-Type': 'application/x-tar' },
    });
  };
}

async function getDifficulty(req: Request, res: Response<PairsetDifficulty>): Promise<void> {
  res.json(await pairsetDifficulty((req.valid.params as IdParam).id));
}
