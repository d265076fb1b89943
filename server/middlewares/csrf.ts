import { doubleCsrf } from 'csrf-csrf';
import type { Request } from 'express';
import type { Config } from '../core/config';

declare module 'express-session' {
  interface SessionData {
    /** Set when a CSRF token is issued, so the session (and the token bound to it) persists before sign-in. */
    csrfIssuedAt?: number;
  }
}

/**
 * Double-submit CSRF protection bound to the session (csrf-csrf): the token comes from GET /api/auth/csrf
 * and goes back in the x-csrf-token header on every state-changing request made with the session cookie.
 */
export function createCsrf(config: Config, secret: string) {
  const { doubleCsrfProtection, generateCsrfToken } = doubleCsrf({
    getSecret: () => secret,
    getSessionIdentifier: (req: Request) => req.session.id,
    cookieName: config.tls ? '__Host-kinefold.csrf' : 'kinefold.csrf',
    cookieOptions: { sameSite: 'lax', secure: config.tls, httpOnly: true, path: '/' },
    getCsrfTokenFromRequest: (req: Request) => req.headers['x-csrf-token'],
    // A request authenticated by an API token carries no cookie a third-party page could ride on.
    skipCsrfProtection: (req: Request) => req.authenticatedBy === 'token',
  });
  return {
    protect: doubleCsrfProtection,
    issueToken(req: Request, res: import('express').Response): string {
      req.session.csrfIssuedAt = Date.now();
      return generateCsrfToken(req, res, { overwrite: true });
    },
  };
}
