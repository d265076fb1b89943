import bcrypt from 'bcryptjs';
import { passwordProblem } from '../../../shared/password-rules';
import { badRequest } from '../errors';

/** bcrypt's work factor; below 10 is too cheap to slow a guesser (OWASP Password Storage Cheat Sheet). */
export const MIN_BCRYPT_COST = 10;

export function hashPassword(password: string, cost: number): Promise<string> {
  return bcrypt.hash(password, Math.max(cost, MIN_BCRYPT_COST));
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

/** Throws a 400 naming the `password` field when the password breaks the shared rule. */
export function assertPasswordAcceptable(password: string, email?: string): void {
  const problem = passwordProblem(password, email);
  if (problem) throw badRequest('weak_password', problem, { field: 'password' });
}
