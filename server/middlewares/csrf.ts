import { randomBytes } from 'node:crypto';
import { doubleCsrf } from 'csrf-csrf';
import type { Request, Response } from 'express';
import type { Config } from '../core/config';

/**
 * Double-submit CSRF protection (csrf-csrf): the token comes from GET /api/auth/csrf and goes back in the
 * x-csrf-token header on every state-changing request made with cookies. A signed-in request's token is bound to
 * its session; a signed-out one's to a random visitor cookie, so handing a token to someone who is not signed in
 * stores nothing on the server (a session row per anonymous visit would let anyone fill the database).
 */
export function createCsrf(config: Config, secret: string) {
  const visitorCookie = config.tls ? '__Host-kinefold.visitor' : 'kinefold.visitor';
  const visitorOf = (req: Request): string => String((req.cookies as Record<string, unknown>)[visitorCookie] ?? '');
  const { doubleCsrfProtection, generateCsrfToken } = doubleCsrf({
    getSecret: () => secret,
    getSessionIdentifier: (req: Request) => (req.user ? `session:${req.session.id}` : `visitor:${visitorOf(req)}`),
    cookieName: config.tls ? '__Host-kinefold.csrf' : 'kinefold.csrf',
    cookieOptions: { sameSite: 'lax', secure: config.tls, httpOnly: true, path: '/' },
    getCsrfTokenFromRequest: (req: Request) => req.headers['x-csrf-token'],
    // A request authenticated by an API token carries no cookie a third-party page could ride on.
    skipCsrfProtection: (req: Request) => req.authenticatedBy === 'token',
  });
  return {
    protect: doubleCsrfProtection,
    issueToken(req: Request, res: Response): string {
      if (!req.user && !visitorOf(req)) {
        const visitor = randomBytes(24).toString('base64url');
        res.cookie(visitorCookie, visitor, { sameSite: 'lax', secure: config.tls, httpOnly: true, path: '/' });
        (req.cookies as Record<string, string>)[visitorCookie] = visitor;
      }
      return generateCsrfToken(req, res, { overwrite: true });
    },
  };
}
