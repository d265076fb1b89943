import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { clipListQuerySchema, clipPatchSchema, type ClipListQuery, type ClipPatch } from '../../shared/schemas/clips';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { ClipDetail, ClipSummary } from '../../shared/types/clips';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { receiveClipUpload } from '../middlewares/upload';
import { validated } from '../middlewares/validate';
import { admitUpload } from '../core/clips/clip-admission';
import { clipSourceObject, getClipDetail, listClips, removeClip, updateClipMetadata } from '../core/clips/clips';
import type { ObjectStore } from '../core/storage/object-store';
import type { StoragePaths } from '../core/storage/paths';
import { sendStored } from './send-stored';

export function createClipsRouter(
  { paths, store }: { paths: StoragePaths; store: ObjectStore },
  uploadLimitBytes: number,
  publicUrl: string,
): Router {
  const router = Router();
  router.post('/', requireRole('operator'), receiveClipUpload(paths, uploadLimitBytes), postClip(store, publicUrl));
  router.get('/', requireSignIn, validated({ query: clipListQuerySchema }, getClips));
  router.get('/:id', requireSignIn, validated({ params: idParamSchema }, getClip));
  router.patch('/:id', requireSignIn, validated({ params: idParamSchema, body: clipPatchSchema }, patchClip));
  router.delete('/:id', requireSignIn, validated({ params: idParamSchema }, deleteClip(store)));
  router.get('/:id/source', requireSignIn, validated({ params: idParamSchema }, getClipSource(store)));
  return router;
}

function postClip(store: ObjectStore, publicUrl: string) {
  return async (req: Request, res: Response<ClipSummary>) => {
    const clip = await admitUpload(req.file!.received!, req.file!.originalname, currentUser(req).id, {
      store,
      publicUrl,
    });
    res.status(HttpStatus.CREATED).json(clip);
  };
}

async function getClips(
  { query }: { query: ClipListQuery },
  _req: Request,
  res: Response<ListPage<ClipSummary>>,
): Promise<void> {
  res.json(await listClips(query));
}

async function getClip({ params }: { params: IdParam }, req: Request, res: Response<ClipDetail>): Promise<void> {
  res.json(await getClipDetail(params.id, currentUser(req)));
}

async function patchClip(
  { params, body }: { params: IdParam; body: ClipPatch },
  req: Request,
  res: Response<ClipDetail>,
): Promise<void> {
  res.json(await updateClipMetadata(params.id, body, currentUser(req)));
}

function deleteClip(store: ObjectStore) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response) => {
    await removeClip(params.id, currentUser(req), store);
    res.status(HttpStatus.NO_CONTENT).end();
  };
}

/** The source file, typed by its stored extension, with HTTP Range support (206 to one range). */
function getClipSource(store: ObjectStore) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response) => {
    await sendStored(req, res, store, await clipSourceObject(params.id));
  };
}
