import { Router, type Request, type Response } from 'express';
import type { Notice } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import {
  resetPasswordSchema,
  resetRequestSchema,
  type ResetPasswordBody,
  type ResetRequestBody,
} from '../../shared/schemas/password-reset';
import type { Config } from '../core/config';
import { createResetRequestLimits } from '../middlewares/reset-request-limits';
import { validated } from '../middlewares/validate';
import { requestPasswordReset, resetPassword } from '../core/people/password-reset';

export const RESET_REQUESTED =
  'If that address belongs to an active Kinefold account, a link to choose a new ' +
  'password is on its way. It works for one hour.';

/** "Forgot password" from the sign-in page, and the form its link leads to; both work signed out. */
export function createPasswordResetRouter(config: Config): Router {
  const router = Router();
  router.post(
    '/reset-request',
    ...createResetRequestLimits(config),
    validated({ body: resetRequestSchema }, requestReset(config)),
  );
  router.post('/reset', validated({ body: resetPasswordSchema }, reset(config)));
  return router;
}

function requestReset(config: Config) {
  return ({ body }: { body: ResetRequestBody }, _req: Request, res: Response<Notice>) => {
    const { email } = body;
    res.status(HttpStatus.ACCEPTED).json({ message: RESET_REQUESTED });
    // The work starts once the answer is out, so the answer's timing says nothing about the address.
    requestPasswordReset(email, config).catch((error: unknown) => {
      console.error(`[${res.locals.requestId as string}] password-reset request failed`, error);
    });
  };
}

function reset(config: Config) {
  return async ({ body }: { body: ResetPasswordBody }, req: Request, res: Response) => {
    const { token, password } = body;
    await resetPassword(token, password, req.sessionID ?? null, config.bcryptCost);
    res.status(HttpStatus.NO_CONTENT).end();
  };
}
