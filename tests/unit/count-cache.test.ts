import { describe, expect, it } from 'vitest';
import { COUNT_REUSE_MS, reusedCount } from '../../server/core/db/count-cache';
import { noteWrite } from '../../server/core/db/reused-reads';

describe('reused list totals', () => {
  it('counts once for many askers, again after a write of this process or once the reuse time is over', async () => {
    let counted = 0;
    const count = async () => ++counted;
    const at = 5_000_000;
    const answers = await Promise.all(Array.from({ length: 20 }, () => reusedCount('queue a', count, at)));
    expect(answers).toEqual(Array(20).fill(1));
    expect(await reusedCount('queue b', count, at)).toBe(2);
    noteWrite();
    expect(await reusedCount('queue a', count, at + 1)).toBe(3);
    expect(await reusedCount('queue a', count, at + COUNT_REUSE_MS)).toBe(3);
    expect(await reusedCount('queue a', count, at + 1 + COUNT_REUSE_MS)).toBe(4);
  });

  it('forgets a count that failed, so the next asker tries again', async () => {
    await expect(reusedCount('broken', () => Promise.reject(new Error('disk')), 1)).rejects.toThrow('disk');
    expect(await reusedCount('broken', async () => 7, 2)).toBe(7);
  });
});
