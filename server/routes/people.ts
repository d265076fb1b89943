import { Router, type Request, type Response } from 'express';
import type { ResetLinkSent, UserSummary } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import { updateUserSchema, type UpdateUserBody } from '../../shared/schemas/people';
import type { Config } from '../core/config';
import { currentUser, requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { sendResetLink, updateUser } from '../core/people/user-admin';

/** What an admin does to one person on the people screen (mounted beside the users list at /users). */
export function createPeopleRouter(config: Config): Router {
  const router = Router();
  router.patch('/:id', requireRole('admin'), validate({ params: idParamSchema, body: updateUserSchema }), patchUser);
  router.post('/:id/password-reset', requireRole('admin'), validate({ params: idParamSchema }), postResetLink(config));
  return router;
}

async function patchUser(req: Request, res: Response<UserSummary>): Promise<void> {
  res.json(await updateUser((req.valid.params as IdParam).id, req.valid.body as UpdateUserBody, currentUser(req)));
}

function postResetLink(config: Config) {
  return async (req: Request, res: Response<ResetLinkSent>) => {
    const sent = await sendResetLink((req.valid.params as IdParam).id, currentUser(req), config);
    res.status(HttpStatus.ACCEPTED).json(sent);
  };
}
