import type { SessionData, Store } from 'express-session';
import { reusedReads } from '../core/db/reused-reads';

/**
 * How long a session read from the store answers later requests of the same session from memory. Every request of
 * a signed-in person reads their session; this process's own writes (sign-in, sign-out, a session ended by a
 * password change or by disabling the account, any other write) end the reuse at once, so only another server
 * process's sign-out or ended session can go unseen here, for at most this long.
 */
export const SESSION_REUSE_MS = 5_000;
/** Sessions kept in memory at most; the oldest is forgotten first (and simply read again). */
const REMEMBERED_SESSIONS = 10_000;

/**
 * Serves `store.get` from memory for SESSION_REUSE_MS. Only reads are reused: `set`, `touch` and `destroy` reach
 * the store exactly as before. Each request gets its own copy of the session, so what one request changes cannot
 * show in another's.
 */
export function reuseSessionReads(store: Store): void {
  const get = store.get.bind(store);
  const sessions = reusedReads<string | null>(SESSION_REUSE_MS, REMEMBERED_SESSIONS);
  const read = (sid: string) =>
    new Promise<string | null>((resolve, reject) => {
      get(sid, (error: unknown, session?: SessionData | null) =>
        error ? reject(error) : resolve(session ? JSON.stringify(session) : null),
      );
    });
  store.get = (sid, callback) => {
    sessions
      .read(sid, () => read(sid))
      .then(
        (text) => callback(null, text === null ? null : (JSON.parse(text) as SessionData)),
        (error: unknown) => callback(error),
      );
  };
}
