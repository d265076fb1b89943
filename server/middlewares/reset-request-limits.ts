import type { Request, Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { ApiErrorBody } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import type { Config } from '../core/config';

function tooMany(windowMs: number) {
  return (_req: Request, res: Response) => {
    const body: ApiErrorBody = {
      error: {
        code: 'too_many_reset_requests',
        message: `Too many password-reset requests. Wait ${Math.ceil(windowMs / 60_000)} minutes and try again.`,
      },
    };
    res.status(HttpStatus.TOO_MANY_REQUESTS).json(body);
  };
}

/**
 * Two limits on reset requests: all requests from one address, and requests naming one e-mail address.
 * Every request counts, found or not, so the limit neither floods a mailbox nor reveals which accounts exist.
 */
export function createResetRequestLimits(config: Config) {
  const perIp = rateLimit({
    windowMs: config.resetWindowMs,
    limit: config.resetLimitPerIp,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: tooMany(config.resetWindowMs),
  });
  const perAccount = rateLimit({
    windowMs: config.resetWindowMs,
    limit: config.resetLimitPerAccount,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req: Request) =>
      `reset:${String(req.body?.email ?? '')
        .trim()
        .toLowerCase()}`,
    handler: tooMany(config.resetWindowMs),
  });
  return [perIp, perAccount];
}
