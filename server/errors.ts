import { HttpStatus, type HttpStatusCode } from '../shared/http-status';

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
