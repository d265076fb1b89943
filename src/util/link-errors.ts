import { HttpStatus } from '../../shared/http-status';
import { ApiError } from '../api/http';

/** True when the server says a mailed link itself is unusable: unknown, used, revoked, expired or cut short. */
export function isLinkError(error: unknown): error is ApiError {
  if (!(error instanceof ApiError)) return false;
  return (
    error.status === HttpStatus.GONE ||
    error.status === HttpStatus.NOT_FOUND ||
    (error.status === HttpStatus.BAD_REQUEST && error.message.startsWith('token'))
  );
}
