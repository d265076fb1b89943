import { createHash, randomBytes } from 'node:crypto';

export interface OneTimeToken {
  /** Goes into the link and nowhere else. */
  token: string;
  /** What the database keeps, so a leaked database holds no working links. */
  tokenHash: string;
}

/**
 * A link token of 256 random bits. A fast hash is enough to store it: unlike a password it cannot be
 * guessed, so the slow hashing that protects passwords would add nothing.
 */
export function newOneTimeToken(): OneTimeToken {
  const token = randomBytes(32).toString('base64url');
  return { token, tokenHash: hashOneTimeToken(token) };
}

export function hashOneTimeToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}
