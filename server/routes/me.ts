import { Router, type Request, type Response } from 'express';
import type { Me } from '../../shared/api-types';
import { currentUser, requireSignIn } from '../middlewares/auth';

export const meRouter = Router();

meRouter.get('/', requireSignIn, getMe);

function getMe(req: Request, res: Response<Me>): void {
  res.json(currentUser(req).toApi());
}
