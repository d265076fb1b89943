import type { NextFunction, Request, Response } from 'express';
import { HttpStatus } from '../../shared/http-status';
import { AppError } from '../core/errors';
import { authenticateApiToken } from '../core/people/api-tokens';

declare global {
  namespace Express {
    interface Request {
      /** Set when the request was authenticated with `Authorization: Bearer`, not the session cookie. */
      authenticatedBy?: 'token';
    }
  }
}

const READ_METHODS = new Set(['GET', 'HEAD']);

/** The pairset read and download routes, relative to /api: the only ones an API token opens. */
const TOKEN_ROUTES: readonly RegExp[] = [
  /^\/pairsets\/?$/,
  /^\/pairsets\/[^/]+\/?$/,
  /^\/pairsets\/[^/]+\/(?:manifest|difficulty)\/?$/,
  /^\/pairsets\/[^/]+\/shards\/[^/]+\/?$/,
];

/**
 * The routes open to anyone, relative to /api: they need no one signed in, so an Authorization header there
 * (a script's default header, a proxy's) is none of their business and is ignored rather than refused.
 */
const ANYONE_ROUTES: readonly [method: string, route: RegExp][] = [
  ['GET', /^\/health\/?$/],
  ['GET', /^\/auth\/csrf\/?$/],
  ['POST', /^\/auth\/(?:sign-in|reset-request|reset)\/?$/],
  ['GET', /^\/invitations\/[^/]+\/?$/],
  ['POST', /^\/invitations\/[^/]+\/accept\/?$/],
];

export function openToAnyone(method: string, path: string): boolean {
  const asGet = method === 'HEAD' ? 'GET' : method;
  return ANYONE_ROUTES.some(([routeMethod, route]) => routeMethod === asGet && route.test(path));
}

/** True for the requests a token may make: reading and downloading pairsets. */
export function tokenMayOpen(method: string, path: string): boolean {
  return READ_METHODS.has(method) && TOKEN_ROUTES.some((route) => route.test(path));
}

/**
 * `Authorization: Bearer <token>` for scripts. On a pairset read or download route the token's user becomes the
 * request's user (in place of any session) and CSRF is skipped, since no cookie is involved; on any other route a
 * token is refused with 403, so a leaked token can only read pairsets; on the routes open to anyone it is ignored.
 * Mounted under /api before CSRF.
 */
export async function bearerToken(req: Request, _res: Response, next: NextFunction): Promise<void> {
  const header = req.headers.authorization;
  if (header === undefined || openToAnyone(req.method, req.path)) return next();
  const match = /^Bearer +(\S+) *$/i.exec(header);
  if (!match) {
    throw new AppError(HttpStatus.UNAUTHORIZED, 'token_invalid', 'Authorization must be "Bearer <token>".');
  }
  if (!tokenMayOpen(req.method, req.path)) {
    throw new AppError(
      HttpStatus.FORBIDDEN,
      'token_not_allowed',
      'API tokens work only for reading and downloading pairsets; sign in for everything else.',
    );
  }
  req.user = await authenticateApiToken(match[1]!);
  req.authenticatedBy = 'token';
  next();
}
