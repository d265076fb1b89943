import { Router, type Request, type Response } from 'express';
import type { Me, StorageUse } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import {
  changePasswordSchema, updateProfileSchema, type ChangePasswordBody, type UpdateProfileBody,
} from '../../shared/schemas/profile';
import type { Config } from '../core/config';
import { currentUser, requireSignIn } from '../middlewares/auth';
import { createPasswordChangeLimit } from '../middlewares/password-change-limit';
import { validate } from '../middlewares/validate';
import { changePassword, storageUse, updateProfile } from '../core/people/profile';

/** Every signed-in person sees their storage and edits their own name and password (mounted beside GET /api/me). */
export function createProfileRouter(config: Config): Router {
  const router = Router();
  router.get('/storage', requireSignIn, getStorage);
  router.patch('/', requireSignIn, validate({ body: updateProfileSchema }), patchProfile);
  router.post('/password', requireSignIn, createPasswordChangeLimit(config), validate({ body: changePasswordSchema }),
    postPassword(config));
  return router;
}

async function getStorage(req: Request, res: Response<StorageUse>): Promise<void> {
  res.json(await storageUse(currentUser(req)));
}

async function patchProfile(req: Request, res: Response<Me>): Promise<void> {
  const user = await updateProfile(currentUser(req), req.valid.body as UpdateProfileBody);
  res.json(user.toApi());
}

function postPassword(config: Config) {
  return async (req: Request, res: Response) => {
    await changePassword(currentUser(req), req.valid.body as ChangePasswordBody, req.sessionID, config.bcryptCost);
    res.status(HttpStatus.NO_CONTENT).end();
  };
}
