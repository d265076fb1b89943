import { afterAll, describe, expect, it, vi } from 'vitest';
import { mulberry32, standardNormal } from '../../shared/pairing/seeded-random';
import { forEachFrame } from '../../worker/pipeline/each-frame';
import { createFramePool } from '../../worker/pool/frame-pool';

/** Random points for a k-means run with its silhouette: long enough to be on the thread when the abort comes. */
function points(count: number, dims: number, seed: number): Float64Array {
  const random = mulberry32(seed);
  return Float64Array.from({ length: count * dims }, () => standardNormal(random));
}

const pool = createFramePool(1);
afterAll(() => pool.destroy());

describe('aborting work in the frame pool', () => {
  it('lets a task that has started run to its end on its thread, and never starts one still waiting', async () => {
    const warnings = vi.spyOn(console, 'warn');
    // The thread is up before the abort, so the long task is handed to it at once.
    await pool.runKMeans({ points: points(40, 4, 1), dims: 4, k: 2, seed: 1, withSilhouette: false });
    const controller = new AbortController();
    const started = pool.runKMeans(
      { points: points(3000, 8, 2), dims: 8, k: 8, seed: 2, withSilhouette: true },
      controller.signal,
    );
    const waiting = pool.runKMeans(
      { points: points(3000, 8, 3), dims: 8, k: 8, seed: 3, withSilhouette: true },
      controller.signal,
    );
    const reason = new Error('the clip was removed');
    setTimeout(() => controller.abort(reason), 20);
    // Piscina would have terminated the thread and rejected both; the running one's answer still comes home.
    const outcome = await started;
    expect(outcome.labels).toHaveLength(3000);
    expect(outcome.silhouette).not.toBeNull();
    await expect(waiting).rejects.toBe(reason);
    // The same thread takes the next task, and no stray answer was reported.
    const next = await pool.runKMeans({ points: points(40, 4, 4), dims: 4, k: 2, seed: 4, withSilhouette: false });
    expect(next.labels).toHaveLength(40);
    expect(warnings).not.toHaveBeenCalled();
    warnings.mockRestore();
  });

  it("fails a stage's frames only once every task that started has ended", async () => {
    const ended: number[] = [];
    const context = { signal: new AbortController().signal, progress: () => {} };
    const failure = new Error('frame 1 cannot be read');
    const run = forEachFrame(3, context, async (index) => {
      if (index === 1) throw failure;
      await new Promise((done) => setTimeout(done, 50 * (index + 1)));
      ended.push(index);
    });
    await expect(run).rejects.toBe(failure);
    // Frames 0 and 2 were already running (a thread cannot be stopped): both ended before the failure was given.
    expect(ended.sort()).toEqual([0, 2]);
  });

  it('runs no frame of a stage that starts after the stop (a stop between two stages)', async () => {
    const stop = new AbortController();
    const reason = new Error('the worker is stopping');
    stop.abort(reason);
    let ran = 0;
    const run = forEachFrame(3, { signal: stop.signal, progress: () => {} }, async () => {
      ran += 1;
    });
    await expect(run).rejects.toBe(reason);
    expect(ran).toBe(0);
  });
});
