import type { SessionData, Store } from 'express-session';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { noteWrite } from '../../server/core/db/reused-reads';
import { reuseSessionReads, SESSION_REUSE_MS } from '../../server/middlewares/session-reads';

type Stored = SessionData & { passport?: { user?: number } };

function countingStore(rows: Map<string, Stored>) {
  const reads: string[] = [];
  const store = {
    get: (sid: string, done: (error: unknown, session?: Stored | null) => void) => {
      reads.push(sid);
      setImmediate(() => (sid === 'broken' ? done(new Error('disk')) : done(null, structuredClone(rows.get(sid)))));
    },
  };
  return { store: store as unknown as Store, reads };
}

const get = (store: Store, sid: string) =>
  new Promise<Stored | null | undefined>((resolve, reject) =>
    store.get(sid, (error, session) => (error ? reject(error as Error) : resolve(session as Stored | null))),
  );

afterEach(() => vi.useRealTimers());

describe('reused session reads', () => {
  it('reads a session once for many requests, each getting a copy of its own', async () => {
    const rows = new Map<string, Stored>([
      ['a', { cookie: { originalMaxAge: 1000 }, passport: { user: 7 } } as Stored],
    ]);
    const { store, reads } = countingStore(rows);
    reuseSessionReads(store);
    const answers = await Promise.all(Array.from({ length: 10 }, () => get(store, 'a')));
    expect(reads).toEqual(['a']);
    expect(answers.every((session) => session?.passport?.user === 7)).toBe(true);
    answers[0]!.passport!.user = 8;
    expect((await get(store, 'a'))?.passport?.user).toBe(7);
    expect(await get(store, 'missing')).toBeNull();
  });

  it('reads again after any write of this process (a sign-out, an ended session) or once the lifetime is over', async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    const rows = new Map<string, Stored>([['a', { cookie: {}, passport: { user: 7 } } as Stored]]);
    const { store, reads } = countingStore(rows);
    reuseSessionReads(store);
    await get(store, 'a');
    rows.delete('a');
    noteWrite();
    expect(await get(store, 'a')).toBeNull();
    rows.set('a', { cookie: {}, passport: { user: 9 } } as Stored);
    vi.advanceTimersByTime(SESSION_REUSE_MS - 1);
    expect(await get(store, 'a')).toBeNull();
    vi.advanceTimersByTime(1);
    expect((await get(store, 'a'))?.passport?.user).toBe(9);
    expect(reads).toEqual(['a', 'a', 'a']);
  });

  it("passes the store's errors on and tries the store again next time", async () => {
    const { store, reads } = countingStore(new Map());
    reuseSessionReads(store);
    await expect(get(store, 'broken')).rejects.toThrow('disk');
    await expect(get(store, 'broken')).rejects.toThrow('disk');
    expect(reads).toEqual(['broken', 'broken']);
  });
});
