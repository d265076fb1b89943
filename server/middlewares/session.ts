import connectSessionSequelize from 'connect-session-sequelize';
import session from 'express-session';
import type { Sequelize } from 'sequelize';
import type { Config } from '../core/config';
import { reuseSessionReads } from './session-reads';
import { throttleTouches } from './session-touch';

export const SESSION_COOKIE = 'kinefold.sid';
const EXPIRED_SESSION_SWEEP_MS = 15 * 60_000;

interface SessionData {
  passport?: { user?: number };
}

/** Browser sessions stored in SQLite beside everything else, with the signed-in user's id kept as a column. */
export function createSessionMiddleware(config: Config, sequelize: Sequelize, secret: string) {
  const SequelizeStore = connectSessionSequelize(session.Store);
  const store = new SequelizeStore({
    db: sequelize,
    table: 'Session',
    checkExpirationInterval: EXPIRED_SESSION_SWEEP_MS,
    expiration: config.sessionMaxAgeMs,
    extendDefaultFields: (defaults: { data: string; expires: Date }, data: SessionData) => ({
      data: defaults.data,
      expires: defaults.expires,
      userId: data.passport?.user ?? null,
    }),
  });
  throttleTouches(store);
  reuseSessionReads(store);
  const middleware = session({
    name: SESSION_COOKIE,
    secret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: config.tls,
    cookie: { httpOnly: true, sameSite: 'lax', secure: config.tls, maxAge: config.sessionMaxAgeMs },
  });
  return { middleware, stop: () => store.stopExpiringSessions() };
}
