import type { Store } from 'express-session';

/**
 * A rolling session's expiry is written back at most this often. express-session touches the store on every
 * request of a signed-in person, and each touch is a database write: on a busy list page that was a write per
 * request, queued behind uploads and the worker. The row's expiry lags the cookie's by this much at most.
 */
export const TOUCH_EVERY_MS = 60_000;
/** Sessions remembered for throttling; the oldest is forgotten first (it is then simply written once more). */
const REMEMBERED_SESSIONS = 10_000;

/** Makes `store.touch` write a session's new expiry only when the last write is older than TOUCH_EVERY_MS. */
export function throttleTouches(store: Store, now: () => number = Date.now): void {
  const touch = store.touch?.bind(store);
  if (!touch) return;
  const written = new Map<string, number>();
  store.touch = (sid, session, callback) => {
    const last = written.get(sid);
    const at = now();
    if (last !== undefined && at - last < TOUCH_EVERY_MS) {
      callback?.();
      return;
    }
    written.delete(sid);
    written.set(sid, at);
    if (written.size > REMEMBERED_SESSIONS) written.delete(written.keys().next().value!);
    touch(sid, session, callback);
  };
}
