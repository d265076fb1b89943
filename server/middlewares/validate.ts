import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { z } from 'zod';
import { HttpStatus } from '../../shared/http-status';
import { AppError, invalidInput } from '../core/errors';

type InputPart = 'params' | 'query' | 'body';
type Schemas = { [P in InputPart]?: z.ZodType };

/** The parts that have a schema, each as that schema's output (coerced, defaulted). */
export type ValidInput<S extends Schemas> = { [P in keyof S & InputPart]: z.output<NonNullable<S[P]>> };

/** A handler that reads only checked input; handlers never read req.body, req.query or req.params directly. */
export type ValidatedHandler<S extends Schemas, ResBody> = (
  input: ValidInput<S>,
  req: Request,
  res: Response<ResBody>,
  next: NextFunction,
) => Promise<void> | void;

/**
 * Parses params, query and body with their zod schemas and hands the results to the handler; the first problem
 * becomes a 400 naming the field, and a query on a route that declares none is refused. The schemas alone decide the input type (NoInfer), so a handler that declares
 * an input its schemas do not produce fails to compile.
 */
export function validated<S extends Schemas, ResBody>(
  schemas: S,
  handler: ValidatedHandler<NoInfer<S>, ResBody>,
): RequestHandler {
  return (req, res, next) => {
    // A route that declares no query takes none: `?file=…` or any other unknown field is refused, not ignored.
    const unknownField = schemas.query ? undefined : Object.keys(req.query ?? {})[0];
    if (unknownField !== undefined) {
      throw new AppError(
        HttpStatus.BAD_REQUEST,
        'invalid_input',
        `${unknownField}: this address takes no query fields.`,
        { issues: [{ field: unknownField, message: 'unknown query field' }] },
      );
    }
    const input: { [P in InputPart]?: unknown } = {};
    for (const part of ['params', 'query', 'body'] as const) {
      const schema = schemas[part];
      if (!schema) continue;
      const result = schema.safeParse(req[part] ?? {});
      if (!result.success) throw invalidInput(part, result.error);
      input[part] = result.data;
    }
    return handler(input as ValidInput<S>, req, res, next);
  };
}
