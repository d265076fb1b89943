import { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import passport from 'passport';
import type { CsrfToken, Me } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { signInSchema, type SignInBody } from '../../shared/schemas/auth';
import { ACCOUNT_DISABLED } from '../middlewares/passport';
import { AppError } from '../core/errors';
import { validated } from '../middlewares/validate';
import type { User } from '../core/models';
import { recordSignIn } from '../core/people/users';

export interface AuthRouterDeps {
  signInLimits: RequestHandler[];
  issueCsrfToken(req: Request, res: Response): string;
}

export function createAuthRouter(deps: AuthRouterDeps): Router {
  const router = Router();
  router.get('/csrf', getCsrfToken(deps));
  router.post('/sign-in', ...deps.signInLimits, validated({ body: signInSchema }, signIn));
  router.post('/sign-out', signOut);
  return router;
}

function getCsrfToken(deps: AuthRouterDeps) {
  return (req: Request, res: Response<CsrfToken>) => {
    res.json({ token: deps.issueCsrfToken(req, res) });
  };
}

/** Checks the password with passport-local, which reads the (checked) body itself; logIn regenerates the session id. */
function signIn(_input: { body: SignInBody }, req: Request, res: Response<Me>, next: NextFunction): void {
  passport.authenticate('local', (error: unknown, user: User | false, info?: { message?: string }) => {
    if (error) return next(error);
    if (!user) {
      const disabled = info?.message === ACCOUNT_DISABLED;
      return next(
        new AppError(
          disabled ? HttpStatus.FORBIDDEN : HttpStatus.UNAUTHORIZED,
          disabled ? 'account_disabled' : 'wrong_credentials',
          info?.message ?? 'Sign-in failed.',
        ),
      );
    }
    req.logIn(user, (loginError) => {
      if (loginError) return next(loginError);
      recordSignIn(user)
        .then(() => res.json(user.toApi()))
        .catch(next);
    });
  })(req, res, next);
}

function signOut(req: Request, res: Response, next: NextFunction): void {
  req.logout((logoutError) => {
    if (logoutError) return next(logoutError);
    req.session.destroy((destroyError) => {
      if (destroyError) return next(destroyError);
      res.clearCookie('kinefold.sid');
      res.status(HttpStatus.NO_CONTENT).end();
    });
  });
}
