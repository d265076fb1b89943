import type { Store } from 'express-session';
import { describe, expect, it } from 'vitest';
import { throttleTouches, TOUCH_EVERY_MS } from '../../server/middlewares/session-touch';

function countingStore() {
  const touched: string[] = [];
  const store = {
    touch: (sid: string, _session: unknown, done?: () => void) => {
      touched.push(sid);
      done?.();
    },
  };
  return { store: store as unknown as Store, touched };
}

describe('throttled session touches', () => {
  it('writes a session once per interval however many requests it serves, and each session on its own', () => {
    const { store, touched } = countingStore();
    let clock = 1_000_000;
    throttleTouches(store, () => clock);
    const answered: string[] = [];
    for (let i = 0; i < 50; i += 1) {
      store.touch!('a', {} as never, () => answered.push('a'));
      store.touch!('b', {} as never, () => answered.push('b'));
      clock += 1000;
    }
    // 50 s of requests: inside one interval, so one write each, and every caller still got its answer.
    expect(touched).toEqual(['a', 'b']);
    expect(answered).toHaveLength(100);
    clock += TOUCH_EVERY_MS;
    store.touch!('a', {} as never, () => undefined);
    expect(touched).toEqual(['a', 'b', 'a']);
  });
});
