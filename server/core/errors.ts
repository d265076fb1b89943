import type { z } from 'zod';
import { HttpStatus, type HttpStatusCode } from '../../shared/http-status';
import { issueField } from '../../shared/schemas/issue-field';

/** An error a person can act on: its status, a stable code for scripts and a plain message. */
export class AppError extends Error {
  constructor(
    readonly status: HttpStatusCode,
    readonly code: string,
    message: string,
    readonly details?: unknown,
    /** What went wrong underneath (a tool's output, a path): logged with the request id, never sent. */
    cause?: unknown,
  ) {
    super(message, { cause });
    this.name = 'AppError';
  }
}

export const notFound = (what: string) => new AppError(HttpStatus.NOT_FOUND, 'not_found', `${what} not found.`);
export const conflict = (code: string, message: string, details?: unknown) =>
  new AppError(HttpStatus.CONFLICT, code, message, details);
export const badRequest = (code: string, message: string, details?: unknown) =>
  new AppError(HttpStatus.BAD_REQUEST, code, message, details);

/** A zod failure as a 400 whose message starts with the field at fault. */
export function invalidInput(part: string, error: z.ZodError): AppError {
  const issues = error.issues.map((issue) => {
    const { path, unknownKeys } = issueField(issue);
    const field = path.join('.');
    const others = unknownKeys.slice(1);
    const message =
      unknownKeys.length > 0
        ? `is not a known field${others.length > 0 ? ` (nor ${others.join(', ')})` : ''}`
        : issue.message;
    return { field: field || part, message };
  });
  const first = issues[0]!;
  return new AppError(HttpStatus.BAD_REQUEST, 'invalid_input', `${first.field}: ${first.message}`, { issues });
}
