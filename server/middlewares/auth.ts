import type { NextFunction, Request, Response } from 'express';
import { HttpStatus } from '../../shared/http-status';
import { roleAllows, type Role } from '../../shared/roles';
import { AppError } from '../core/errors';
import type { User } from '../core/models';

declare global {
  namespace Express {
    // passport puts the signed-in Kinefold user here.
    interface User {
      id: number;
      role: Role;
    }
  }
}

const signInNeeded = () => new AppError(HttpStatus.UNAUTHORIZED, 'sign_in_required', 'Sign in to continue.');

export function requireSignIn(req: Request, _res: Response, next: NextFunction): void {
  if (!req.user) throw signInNeeded();
  next();
}

/** Lets the request through for the given roles (an admin always passes); 401 when signed out, 403 otherwise. */
export function requireRole(...roles: Role[]) {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (!req.user) throw signInNeeded();
    if (!roleAllows(req.user.role, roles)) {
      throw new AppError(HttpStatus.FORBIDDEN, 'forbidden', `This needs the ${roles.join(' or ')} role.`);
    }
    next();
  };
}

/** The signed-in user; only call behind requireSignIn or requireRole. */
export function currentUser(req: Request): User {
  return req.user as unknown as User;
}
