import { Router, type Request, type Response } from 'express';
import { settingsSchema, type Settings } from '../../shared/schemas/settings';
import type { PublicAddress } from '../../shared/types/admin';
import type { Config } from '../core/config';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { currentSettings, saveSettings } from '../core/settings/settings';

/** `/api/settings`: the reject reasons live beside it at `/api/settings/reject-reasons` (Review). */
export function createSettingsRouter(config: Config): Router {
  const router = Router();
  router.get('/', requireRole('admin'), getSettings(config));
  router.put('/', requireRole('admin'), validated({ body: settingsSchema }, putSettings(config)));
  router.get('/public-url', requireRole('admin'), validated({}, getPublicAddress(config)));
  return router;
}

function getSettings(config: Config) {
  return async (_req: Request, res: Response<Settings>) => {
    res.json(await currentSettings(config));
  };
}

/** Read-only: the public URL comes from the environment (KINEFOLD_PUBLIC_URL, else this server's PORT). */
function getPublicAddress(config: Config) {
  return (_input: object, _req: Request, res: Response<PublicAddress>) => {
    res.json({ publicUrl: config.publicUrl, source: config.publicUrlSource });
  };
}

function putSettings(config: Config) {
  return async ({ body }: { body: Settings }, req: Request, res: Response<Settings>) => {
    await saveSettings(body, currentUser(req).id);
    res.json(await currentSettings(config));
  };
}
