import type { NextFunction, Request, Response } from 'express';
import type { ApiErrorBody } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { AppError } from '../core/errors';

function send(res: Response, status: number, body: ApiErrorBody): void {
  res.status(status).json(body);
}

/** Unknown routes under /api answer JSON, never the client's HTML. */
export function apiNotFound(req: Request, res: Response): void {
  send(res, HttpStatus.NOT_FOUND, {
    error: { code: 'not_found', message: `No API route ${req.method} ${req.originalUrl.split('?')[0]}.` },
  });
}

interface HttpLikeError {
  status?: number;
  statusCode?: number;
  type?: string;
  code?: string;
  expose?: boolean;
  message?: string;
}

/** The one place errors become answers: known errors keep their status and message; the rest are logged. */
export function errorHandler(error: unknown, req: Request, res: Response, _next: NextFunction): void {
  // A client that hung up mid-request (a cancelled upload) gets no answer and is not a server fault.
  if (!res.socket || res.socket.destroyed) return;
  if (error instanceof AppError) {
    if (error.cause !== undefined) {
      console.warn(
        `[${res.locals.requestId ?? '-'}] ${req.method} ${req.originalUrl} ${error.status} ${error.code}:`,
        error.cause,
      );
    }
    send(res, error.status, { error: { code: error.code, message: error.message, details: error.details } });
    return;
  }
  const httpError = error as HttpLikeError;
  const status = httpError.status ?? httpError.statusCode;
  if (httpError.code === 'EBADCSRFTOKEN') {
    send(res, HttpStatus.FORBIDDEN, {
      error: { code: 'csrf_invalid', message: 'The form was stale or came from elsewhere; reload and try again.' },
    });
    return;
  }
  if (httpError.type === 'entity.parse.failed') {
    send(res, HttpStatus.BAD_REQUEST, {
      error: { code: 'invalid_json', message: 'The request body is not valid JSON.' },
    });
    return;
  }
  if (httpError.type === 'entity.too.large') {
    send(res, HttpStatus.PAYLOAD_TOO_LARGE, {
      error: { code: 'body_too_large', message: 'The request body is too large.' },
    });
    return;
  }
  if (status && status >= 400 && status < 500 && httpError.expose) {
    send(res, status, { error: { code: 'bad_request', message: httpError.message ?? 'Bad request.' } });
    return;
  }
  const requestId = res.locals.requestId as string | undefined;
  console.error(`[${requestId ?? '-'}] ${req.method} ${req.originalUrl}`, error);
  send(res, HttpStatus.INTERNAL_SERVER_ERROR, {
    error: { code: 'internal', message: `Something went wrong on the server (request ${requestId ?? 'unknown'}).` },
  });
}
