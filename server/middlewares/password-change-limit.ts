import type { Request, Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { ApiErrorBody } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import type { Config } from '../core/config';
import { currentUser } from './auth';

/**
 * Refused password changes per signed-in person, with the sign-in limit per account: a changed password needs the
 * current one, so without a limit a session left open could be used to guess it.
 */
export function createPasswordChangeLimit(config: Config) {
  const minutes = Math.ceil(config.signInWindowMs / 60_000);
  return rateLimit({
    windowMs: config.signInWindowMs,
    limit: config.signInLimitPerAccount,
    skipSuccessfulRequests: true,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req: Request) => `password-change:${currentUser(req).id}`,
    handler: (_req: Request, res: Response) => {
      const body: ApiErrorBody = {
        error: {
          code: 'too_many_password_attempts',
          message: `Too many refused password changes. Wait ${minutes} minutes and try again.`,
        },
      };
      res.status(HttpStatus.TOO_MANY_REQUESTS).json(body);
    },
  });
}
