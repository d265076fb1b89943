import { createHmac, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

const SECRET_FILE = 'server-secret';

/**
 * The secret that signs session cookies and CSRF tokens: from KINEFOLD_SESSION_SECRET when set, otherwise
 * made once and kept beside the database (mode 0600) so sessions survive a restart.
 */
export function loadServerSecret(storageDir: string, configured: string): string {
  if (configured) return configured;
  const file = path.join(storageDir, 'db', SECRET_FILE);
  try {
    return fs.readFileSync(file, 'utf8').trim();
  } catch {
    fs.mkdirSync(path.dirname(file), { recursive: true });
    const secret = randomBytes(32).toString('hex');
    fs.writeFileSync(file, secret, { mode: 0o600, flag: 'wx' });
    return secret;
  }
}

/** A separate key per purpose, so a cookie signature can never be replayed as a CSRF token. */
export function deriveKey(secret: string, purpose: string): string {
  return createHmac('sha256', secret).update(purpose).digest('hex');
}
