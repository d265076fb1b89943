import type { NextFunction, Request, Response } from 'express';
import type { z } from 'zod';
import { invalidInput } from '../core/errors';

declare global {
  namespace Express {
    interface Request {
      /** Input that passed its zod schema; handlers read only this, never req.body or req.query directly. */
      valid: { body?: unknown; query?: unknown; params?: unknown };
    }
  }
}

interface Schemas {
  body?: z.ZodType;
  query?: z.ZodType;
  params?: z.ZodType;
}

/** Validates body, query and params with zod; the first problem becomes a 400 naming the field. */
export function validate(schemas: Schemas) {
  return (req: Request, _res: Response, next: NextFunction) => {
    req.valid = {};
    for (const part of ['params', 'query', 'body'] as const) {
      const schema = schemas[part];
      if (!schema) continue;
      const result = schema.safeParse(req[part] ?? {});
      if (!result.success) throw invalidInput(part, result.error);
      req.valid[part] = result.data;
    }
    next();
  };
}
