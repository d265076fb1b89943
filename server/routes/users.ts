import { Router, type Request, type Response } from 'express';
import type { ListPage, ResetLinkSent, UserSummary } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import { updateUserSchema, type UpdateUserBody } from '../../shared/schemas/people';
import { userListQuerySchema, type UserListQuery } from '../../shared/schemas/users';
import type { Config } from '../core/config';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { sendResetLink, updateUser } from '../core/people/user-admin';
import { listUsers } from '../core/people/users';

/** The people screen under /users: admins list everyone, edit one person and send them a reset link. */
export function createUsersRouter(config: Config): Router {
  const router = Router();
  router.get('/', requireRole('admin'), validated({ query: userListQuerySchema }, getUsers));
  router.patch('/:id', requireRole('admin'), validated({ params: idParamSchema, body: updateUserSchema }, patchUser));
  router.post('/:id/password-reset', requireRole('admin'), validated({ params: idParamSchema }, postResetLink(config)));
  return router;
}

async function getUsers(
  { query }: { query: UserListQuery },
  _req: Request,
  res: Response<ListPage<UserSummary>>,
): Promise<void> {
  res.json(await listUsers(query));
}

async function patchUser(
  { params, body }: { params: IdParam; body: UpdateUserBody },
  req: Request,
  res: Response<UserSummary>,
): Promise<void> {
  res.json(await updateUser(params.id, body, currentUser(req)));
}

function postResetLink(config: Config) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response<ResetLinkSent>) => {
    const sent = await sendResetLink(params.id, currentUser(req), config);
    res.status(HttpStatus.ACCEPTED).json(sent);
  };
}
