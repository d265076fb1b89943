import type { Request, Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { ApiErrorBody } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import type { Config } from '../core/config';

function tooMany(windowMs: number) {
  return (_req: Request, res: Response) => {
    const minutes = Math.ceil(windowMs / 60_000);
    const body: ApiErrorBody = {
      error: {
        code: 'too_many_sign_in_attempts',
        message: `Too many sign-in attempts. Wait ${minutes} minutes and try again, or ask an admin to reset the password.`,
      },
    };
    res.status(HttpStatus.TOO_MANY_REQUESTS).json(body);
  };
}

/**
 * Two limits on sign-in: every attempt from one address, and failed attempts on one account
 * (so a guesser spreading over many addresses still stops at the account).
 */
export function createSignInLimits(config: Config) {
  const perIp = rateLimit({
    windowMs: config.signInWindowMs,
    limit: config.signInLimitPerIp,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: tooMany(config.signInWindowMs),
  });
  const perAccount = rateLimit({
    windowMs: config.signInWindowMs,
    limit: config.signInLimitPerAccount,
    skipSuccessfulRequests: true,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req: Request) =>
      `account:${String(req.body?.email ?? '')
        .trim()
        .toLowerCase()}`,
    handler: tooMany(config.signInWindowMs),
  });
  return [perIp, perAccount];
}
