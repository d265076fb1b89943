import { Router } from 'express';
import { apiNotFound } from '../middlewares/errors';
import { createAuthRouter, type AuthRouterDeps } from './auth';
import { healthRouter } from './health';
import { meRouter } from './me';
import { usersRouter } from './users';

/** Every API route under /api, then a JSON 404 for anything else there. */
export function createApiRouter(authDeps: AuthRouterDeps): Router {
  const api = Router();
  api.use('/health', healthRouter);
  api.use('/auth', createAuthRouter(authDeps));
  api.use('/me', meRouter);
  api.use('/users', usersRouter);
  api.use(apiNotFound);
  return api;
}
