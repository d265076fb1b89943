import { Router, type Request, type Response } from 'express';
import type { Me, StorageUse } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import {
  changePasswordSchema,
  updateProfileSchema,
  type ChangePasswordBody,
  type UpdateProfileBody,
} from '../../shared/schemas/profile';
import type { Config } from '../core/config';
import { currentUser, requireSignIn } from '../middlewares/auth';
import { createPasswordChangeLimit } from '../middlewares/password-change-limit';
import { validated } from '../middlewares/validate';
import { changePassword, storageUse, updateProfile } from '../core/people/profile';

/** Under /me: every signed-in person reads their account and storage and edits their own name and password. */
export function createMeRouter(config: Config): Router {
  const router = Router();
  router.get('/', requireSignIn, getMe);
  router.get('/storage', requireSignIn, getStorage);
  router.patch('/', requireSignIn, validated({ body: updateProfileSchema }, patchProfile));
  router.post(
    '/password',
    requireSignIn,
    createPasswordChangeLimit(config),
    validated({ body: changePasswordSchema }, postPassword(config)),
  );
  return router;
}

function getMe(req: Request, res: Response<Me>): void {
  res.json(currentUser(req).toApi());
}

async function getStorage(req: Request, res: Response<StorageUse>): Promise<void> {
  res.json(await storageUse(currentUser(req)));
}

async function patchProfile({ body }: { body: UpdateProfileBody }, req: Request, res: Response<Me>): Promise<void> {
  const user = await updateProfile(currentUser(req), body);
  res.json(user.toApi());
}

function postPassword(config: Config) {
  return async ({ body }: { body: ChangePasswordBody }, req: Request, res: Response) => {
    await changePassword(currentUser(req), body, req.sessionID, config.bcryptCost);
    res.status(HttpStatus.NO_CONTENT).end();
  };
}
