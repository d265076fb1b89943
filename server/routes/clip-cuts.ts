import { Router, type Request, type Response } from 'express';
import { frameParamSchema, type FrameParam } from '../../shared/schemas/clip-media';
import { cutMarkBodySchema, type CutMarkBody } from '../../shared/schemas/cuts';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { ClipCutList, FrameCut } from '../../shared/types/cuts';
import { clearCutMark, listClipCuts, markCut } from '../core/clips/clip-cuts';
import { currentUser, requireRole, requireSignIn } from '../middlewares/auth';
import { validated } from '../middlewares/validate';

/** A clip's cuts with their evidence, and curators' marks, under /api/clips. */
export function createClipCutsRouter(): Router {
  const router = Router();
  router.get('/:id/cuts', requireSignIn, validated({ params: idParamSchema }, getCuts));
  router.put(
    '/:id/cuts/:index',
    requireRole('curator'),
    validated({ params: frameParamSchema, body: cutMarkBodySchema }, putCutMark),
  );
  router.delete('/:id/cuts/:index', requireRole('curator'), validated({ params: frameParamSchema }, deleteCutMark));
  return router;
}

async function getCuts({ params }: { params: IdParam }, _req: Request, res: Response<ClipCutList>): Promise<void> {
  res.json(await listClipCuts(params.id));
}

async function putCutMark(
  { params, body }: { params: FrameParam; body: CutMarkBody },
  req: Request,
  res: Response<FrameCut>,
): Promise<void> {
  res.json(await markCut(params.id, params.index, body.value, currentUser(req)));
}

async function deleteCutMark({ params }: { params: FrameParam }, req: Request, res: Response<FrameCut>): Promise<void> {
  res.json(await clearCutMark(params.id, params.index, currentUser(req)));
}
