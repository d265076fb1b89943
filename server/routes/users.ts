import { Router, type Request, type Response } from 'express';
import type { ListPage, UserSummary } from '../../shared/api-types';
import { userListQuerySchema, type UserListQuery } from '../../shared/schemas/users';
import { requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { listUsers } from '../core/people/users';

export const usersRouter = Router();

usersRouter.get('/', requireRole('admin'), validate({ query: userListQuerySchema }), getUsers);

async function getUsers(req: Request, res: Response<ListPage<UserSummary>>): Promise<void> {
  res.json(await listUsers(req.valid.query as UserListQuery));
}
