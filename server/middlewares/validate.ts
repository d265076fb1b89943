import type { NextFunction, Request, Response } from 'express';
import type { z } from 'zod';
import { HttpStatus } from '../../shared/http-status';
import { AppError } from '../errors';

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

/**
 * Validates body, query and params with zod; the first problem becomes a 400 naming the field. A route that
 * declares no query takes none: `?file=…` or any other unknown field is refused, not ignored.
 */
export function validate(schemas: Schemas) {
  return (req: Request, _res: Response, next: NextFunction) => {
    req.valid = {};
    const unknownField = schemas.query ? undefined : Object.keys(req.query ?? {})[0];
    if (unknownField !== undefined) {
      throw new AppError(HttpStatus.BAD_REQUEST, 'invalid_input',
        `${unknownField}: this address takes no query fields.`,
        { issues: [{ field: unknownField, message: 'unknown query field' }] });
    }
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

/** A zod failure as a 400 whose message starts with the field at fault. */
export function invalidInput(part: string, error: z.ZodError): AppError {
  const issues = error.issues.map((issue) => {
    const keys = 'keys' in issue && Array.isArray(issue.keys) ? issue.keys.join(', ') : '';
    const field = issue.path.length > 0 ? issue.path.join('.') : keys;
    return { field: field || part, message: issue.message };
  });
  const first = issues[0]!;
  return new AppError(HttpStatus.BAD_REQUEST, 'invalid_input', `${first.field}: ${first.message}`, { issues });
}
