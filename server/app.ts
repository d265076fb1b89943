import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import type { Sequelize } from 'sequelize';
import { configurePassport } from './middlewares/passport';
import type { Config } from './core/config';
import { bearerToken } from './middlewares/bearer-token';
import { createCsrf } from './middlewares/csrf';
import { errorHandler } from './middlewares/errors';
import { createSessionMiddleware } from './middlewares/session';
import { createSignInLimits } from './middlewares/sign-in-limits';
import { createApiRouter } from './routes';
import { deriveKey, loadServerSecret } from './core/people/secrets';
import { sessionMaxAgeMs } from './core/settings/settings';
import type { ObjectStore } from './core/storage/object-store';
import { createObjectStore } from './core/storage/open-store';
import { storagePaths } from './core/storage/paths';

export interface AppContext {
  config: Config;
  sequelize: Sequelize;
  /** Where sources, derived files and shards live; by default the one the configuration names. */
  store?: ObjectStore;
  /** Where the built client lives; served with an SPA fallback when present. */
  clientDir?: string;
}

export interface KinefoldApp {
  app: Express;
  /** Stops the app's background timers (the expired-session sweep). */
  close(): void;
}

/** Builds the Express app: security headers, sessions, CSRF, the API under /api and the built client. */
export function createApp(context: AppContext): KinefoldApp {
  const { config, sequelize } = context;
  const secret = loadServerSecret(config.storageDir, config.sessionSecret);
  const sessions = createSessionMiddleware(config, sequelize, deriveKey(secret, 'session'));
  const csrf = createCsrf(config, deriveKey(secret, 'csrf'));
  const passport = configurePassport();

  const app = express();
  app.disable('x-powered-by');
  if (config.tls) app.set('trust proxy', 1);
  app.use((_req, res, next) => {
    res.locals.requestId = randomUUID();
    res.setHeader('X-Request-Id', res.locals.requestId as string);
    next();
  });
  app.use(
    helmet({
      // HSTS and upgrade-insecure-requests only make sense when Kinefold is served over TLS.
      strictTransportSecurity: config.tls,
      contentSecurityPolicy: {
        directives: { upgradeInsecureRequests: config.tls ? [] : null, imgSrc: ["'self'", 'data:', 'blob:'] },
      },
    }),
  );
  // The built client's files come before sessions: they are the same for everyone, so reading the session and the
  // user from the database for each of the ~30 files a page loads was work for nothing.
  if (context.clientDir) serveClientFiles(app, context.clientDir);
  app.use(express.json({ limit: '1mb' }));
  app.use(cookieParser());
  app.use(sessions.middleware);
  // The session lifetime is an admin setting; each request's cookie gets the one in force (rolling sessions).
  app.use((req, _res, next) => {
    sessionMaxAgeMs(config).then((ms) => {
      if (req.session) req.session.cookie.maxAge = ms;
      next();
    }, next);
  });
  app.use(passport.session());
  app.use(
    '/api',
    bearerToken,
    csrf.protect,
    createApiRouter({
      auth: { signInLimits: createSignInLimits(config), issueCsrfToken: csrf.issueToken },
      paths: storagePaths(config.storageDir),
      store: context.store ?? createObjectStore(config),
      uploadLimitBytes: config.uploadLimitBytes,
      config,
    }),
  );
  if (context.clientDir) serveClientPage(app, context.clientDir);
  app.use(errorHandler);
  return { app, close: sessions.stop };
}

/**
 * The built client's files. Vite names everything under assets/ by a hash of its content, so those never change
 * under their name and a browser may keep them for a year without asking again; other files (the icon) an hour.
 */
function serveClientFiles(app: Express, clientDir: string): void {
  if (!fs.existsSync(path.join(clientDir, 'index.html'))) return;
  app.use('/assets', express.static(path.join(clientDir, 'assets'), { index: false, immutable: true, maxAge: '1y' }));
  app.use(express.static(clientDir, { index: false, maxAge: '1h' }));
}

/** index.html for any other path, so the client's router takes over; asked again each time (no-cache). */
function serveClientPage(app: Express, clientDir: string): void {
  const indexFile = path.join(clientDir, 'index.html');
  if (!fs.existsSync(indexFile)) return;
  app.get('/{*rest}', (_req, res) => {
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}
