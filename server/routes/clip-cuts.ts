import { Router, type Request, type Response } from 'express';
import { frameParamSchema, type FrameParam } from '../../shared/schemas/clip-media';
import { cutMarkBodySchema, type CutMarkBody } from '../../shared/schemas/cuts';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { ClipCutList, FrameCut } from '../../shared/types/cuts';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { clearCutMark, listClipCuts, markCut } from '../services/clip-cuts';

/** A clip's cuts with their evidence, and curators' marks, under /api/clips. */
export function createClipCutsRouter(): Router {
  const router = Router();
  router.get('/:id/cuts', requireSignIn, validate({ params: idParamSchema }), getCuts);
  const byFrame = validate({ params: frameParamSchema });
  const markBody = validate({ params: frameParamSchema, body: cutMarkBodySchema });
  router.put('/:id/cuts/:index', requireRole('curator'), markBody, putCutMark);
  router.delete('/:id/cuts/:index', requireRole('curator'), byFrame, deleteCutMark);
  return router;
}

async function getCuts(req: Request, res: Response<ClipCutList>): Promise<void> {
  res.json(await listClipCuts((req.valid.params as IdParam).id));
}

async function putCutMark(req: Request, res: Response<FrameCut>): Promise<void> {
  const { id, index } = req.valid.params as FrameParam;
  res.json(await markCut(id, index, (req.valid.body as CutMarkBody).value, currentUser(req)));
}

async function deleteCutMark(req: Request, res: Response<FrameCut>): Promise<void> {
  const { id, index } = req.valid.params as FrameParam;
  res.json(await clearCutMark(id, index, currentUser(req)));
}
