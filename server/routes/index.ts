import { Router } from 'express';
import type { Config } from '../core/config';
import { apiNotFound } from '../middlewares/errors';
import type { ObjectStore } from '../core/storage/object-store';
import type { StoragePaths } from '../core/storage/paths';
import { createAdminRouter } from './admin';
import { createSettingsRouter } from './settings';
import { auditRouter } from './audit';
import { createAuthRouter, type AuthRouterDeps } from './auth';
import { createClipCutsRouter } from './clip-cuts';
import { createClipMediaRouter } from './clip-media';
import { createClipsRouter } from './clips';
import { createClusteringsRouter, createSimilarClipsRouter } from './clusterings';
import { healthRouter } from './health';
import { createInvitationsRouter } from './invitations';
import { jobsRouter } from './jobs';
import { mailRouter } from './mail';
import { createMeRouter } from './me';
import { createPairsetsRouter } from './pairsets';
import { createPasswordResetRouter } from './password-reset';
import { projectsRouter } from './projects';
import { createResumableUploadsRouter } from './resumable-uploads';
import { createClipReviewRouter, createReviewRouter, createReviewSettingsRouter } from './review';
import { tokensRouter } from './tokens';
import { createUsersRouter } from './users';

/** Every API route under /api, then a JSON 404 for anything else there. */
export interface ApiDeps {
  auth: AuthRouterDeps;
  /** Local folders: incoming uploads (received here before they go to the store). */
  paths: StoragePaths;
  /** Sources, derived files and shards. */
  store: ObjectStore;
  uploadLimitBytes: number;
  /** Mail links, password hashing and the reset-request limits read the settings. */
  config: Config;
}

export function createApiRouter(deps: ApiDeps): Router {
  const api = Router();
  api.use('/health', healthRouter);
  api.use('/auth', createAuthRouter(deps.auth));
  api.use('/auth', createPasswordResetRouter(deps.config));
  api.use('/me', createMeRouter(deps.config));
  api.use('/users', createUsersRouter(deps.config));
  api.use('/invitations', createInvitationsRouter(deps.config));
  api.use('/mail', mailRouter);
  api.use('/projects', projectsRouter);
  api.use(
    '/clips/resumable',
    createResumableUploadsRouter({
      paths: deps.paths,
      store: deps.store,
      limitBytes: deps.uploadLimitBytes,
      publicUrl: deps.config.publicUrl,
    }),
  );
  api.use('/clips', createClipsRouter(deps, deps.uploadLimitBytes, deps.config.publicUrl));
  api.use('/clips', createClipMediaRouter(deps.store));
  api.use('/clips', createClipCutsRouter());
  api.use('/clips', createClipReviewRouter());
  api.use('/clips', createSimilarClipsRouter());
  api.use('/review', createReviewRouter());
  api.use('/settings', createReviewSettingsRouter());
  api.use('/settings', createSettingsRouter(deps.config));
  api.use('/admin', createAdminRouter(deps.paths));
  api.use('/jobs', jobsRouter);
  api.use('/pairsets', createPairsetsRouter(deps.store));
  api.use('/clusterings', createClusteringsRouter());
  api.use('/tokens', tokensRouter);
  api.use(auditRouter);
  api.use(apiNotFound);
  return api;
}
