import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { z } from 'zod';
import { invalidInput } from '../core/errors';

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
 * becomes a 400 naming the field. The schemas alone decide the input type (NoInfer), so a handler that declares
 * an input its schemas do not produce fails to compile.
 */
export function validated<S extends Schemas, ResBody>(
  schemas: S,
  handler: ValidatedHandler<NoInfer<S>, ResBody>,
): RequestHandler {
  return (req, res, next) => {
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
