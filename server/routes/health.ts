import { Router, type Request, type Response } from 'express';
import type { Health } from '../../shared/api-types';
import { User } from '../core/models';
import { APP_VERSION } from '../core/version';

export const healthRouter = Router();

healthRouter.get('/', getHealth);

async function getHealth(_req: Request, res: Response<Health>): Promise<void> {
  await User.sequelize!.query('SELECT 1');
  res.json({ status: 'ok', database: 'reachable', version: APP_VERSION });
}
