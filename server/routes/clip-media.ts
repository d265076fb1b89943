import { Router, type Request, type Response } from 'express';
import { HttpStatus } from '../../shared/http-status';
import {
  frameParamSchema,
  pictureHeightQuerySchema,
  viewParamSchema,
  type FrameParam,
  type PictureHeightQuery,
  type ViewParam,
} from '../../shared/schemas/clip-media';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { ClipFrameList, ClipProgress } from '../../shared/types/frames';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import {
  clipProgress,
  frameObject,
  listFrames,
  previewObject,
  reprocessClip,
  shrunkFramePicture,
  thumbnailObject,
  viewPicture,
} from '../core/clips/clip-media';
import { motionFieldPicture } from '../core/clips/clip-motion';
import { shrunkPicture, type MadePicture } from '../core/clips/made-pictures';
import type { ObjectStore, StoredRef } from '../core/storage/object-store';
import { sendStored } from './send-stored';

/**
 * What processing made of a clip, under /api/clips. Stored files stream with Range support (send-stored.ts);
 * views, .flo files and motion pictures are made when asked (or kept from an earlier asking), with an ETag known
 * before they are made.
 */
export function createClipMediaRouter(store: ObjectStore): Router {
  const router = Router();
  const byId = { params: idParamSchema };
  router.get('/:id/frames', requireSignIn, validated(byId, getFrames));
  const picture = { params: frameParamSchema, query: pictureHeightQuerySchema };
  router.get('/:id/frames/:index', requireSignIn, validated(picture, getFrameImage(store)));
  router.get('/:id/views/:index/:view', requireSignIn, validated({ params: viewParamSchema }, getViewImage(store)));
  router.get('/:id/motion/:index', requireSignIn, validated(picture, getMotionPicture(store)));
  router.get('/:id/motion/:index/flo', requireSignIn, validated({ params: frameParamSchema }, getMotionFlo(store)));
  router.get('/:id/thumbnail', requireSignIn, validated(byId, getThumbnail(store)));
  router.get('/:id/preview', requireSignIn, validated(byId, getPreview(store)));
  router.get('/:id/progress', requireSignIn, validated(byId, getProgress));
  router.post('/:id/reprocess', requireRole('admin'), validated(byId, postReprocess));
  return router;
}

async function getFrames({ params }: { params: IdParam }, _req: Request, res: Response<ClipFrameList>): Promise<void> {
  res.json(await listFrames(params.id));
}

/** The frame as stored, or with `?height=` shrunk for the frame strip. */
function getFrameImage(store: ObjectStore) {
  return async ({ params, query }: { params: FrameParam; query: PictureHeightQuery }, req: Request, res: Response) => {
    const { id, index } = params;
    if (query.height) return sendMade(req, res, await shrunkFramePicture(id, index, query.height, store), 'image/webp');
    await sendDerived(req, res, store, await frameObject(id, index));
  };
}

function getViewImage(store: ObjectStore) {
  return async ({ params }: { params: ViewParam }, req: Request, res: Response) => {
    const { id, index, view } = params;
    await sendMade(req, res, await viewPicture(id, index, view, store), 'image/png');
  };
}

/** The colour picture of the forward field from frame index to index + 1; with `?height=` shrunk for the strip. */
function getMotionPicture(store: ObjectStore) {
  return async ({ params, query }: { params: FrameParam; query: PictureHeightQuery }, req: Request, res: Response) => {
    const made = await motionFieldPicture(params.id, params.index, 'picture', store);
    if (query.height) return sendMade(req, res, shrunkPicture(made, query.height), 'image/webp');
    await sendMade(req, res, made, 'image/png');
  };
}

/** The same field as a Middlebury .flo file. */
function getMotionFlo(store: ObjectStore) {
  return async ({ params }: { params: FrameParam }, req: Request, res: Response) => {
    const { id, index } = params;
    const made = await motionFieldPicture(id, index, 'flo', store);
    // .flo has no registered media type; a download name saves scripts from guessing one.
    res.set('Content-Disposition', `attachment; filename="clip-${id}-motion-${index}.flo"`);
    await sendMade(req, res, made, 'application/octet-stream');
  };
}

function getThumbnail(store: ObjectStore) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response) => {
    await sendDerived(req, res, store, await thumbnailObject(params.id));
  };
}

function getPreview(store: ObjectStore) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response) => {
    await sendDerived(req, res, store, await previewObject(params.id));
  };
}

async function getProgress({ params }: { params: IdParam }, _req: Request, res: Response<ClipProgress>): Promise<void> {
  res.json(await clipProgress(params.id));
}

async function postReprocess(
  { params }: { params: IdParam },
  req: Request,
  res: Response<ClipProgress>,
): Promise<void> {
  res.status(HttpStatus.ACCEPTED).json(await reprocessClip(params.id, currentUser(req).id));
}

/**
 * A made file: a browser whose copy has the ETag gets a 304 before anything is made; one byte range (a resumed
 * download) is answered 206 as sendFile would; several ranges get the whole file.
 */
async function sendMade(req: Request, res: Response, made: MadePicture, type: string): Promise<void> {
  res.set({ 'Cache-Control': 'private, no-cache', 'Accept-Ranges': 'bytes', ETag: made.etag }).type(type);
  if (req.fresh) {
    res.status(HttpStatus.NOT_MODIFIED).end();
    return;
  }
  const bytes = await made.bytes();
  const ranges = req.headers.range ? req.range(bytes.length) : undefined;
  if (ranges === -1) {
    res.status(HttpStatus.RANGE_NOT_SATISFIABLE).set('Content-Range', `bytes */${bytes.length}`).end();
    return;
  }
  if (Array.isArray(ranges) && ranges.type === 'bytes' && ranges.length === 1) {
    const { start, end } = ranges[0]!;
    res.status(HttpStatus.PARTIAL_CONTENT).set('Content-Range', `bytes ${start}-${end}/${bytes.length}`);
    res.send(bytes.subarray(start, end + 1));
    return;
  }
  res.send(bytes);
}

/** Derived files change when a clip is processed again, so the browser asks each time (ETag makes that cheap). */
function sendDerived(req: Request, res: Response, store: ObjectStore, ref: StoredRef): Promise<void> {
  return sendStored(req, res, store, ref, { 'Cache-Control': 'private, no-cache' });
}
