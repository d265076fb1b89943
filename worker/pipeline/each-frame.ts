import { setMaxListeners } from 'node:events';
import type { StageContext } from './stage';

/**
 * Runs `task` for frames 0..count−1 at once (the frame pool queues them onto its threads), reports the share
 * done as tasks finish, and at the first failure aborts the tasks still waiting. It fails only once every task has
 * settled: a task already on a thread runs to its end (the frame pool never kills a busy thread), and the clip's
 * folder must not be removed while it may still write there.
 */
export async function forEachFrame<R>(
  count: number,
  context: Pick<StageContext, 'signal' | 'progress'>,
  task: (index: number, signal: AbortSignal) => Promise<R>,
): Promise<R[]> {
  // A stop that came before this call (between two stages) fires no 'abort' event for the listener below.
  context.signal.throwIfAborted();
  const controller = new AbortController();
  // Every queued task listens on this one signal.
  setMaxListeners(0, controller.signal);
  const stop = () => controller.abort(context.signal.reason);
  context.signal.addEventListener('abort', stop, { once: true });
  let done = 0;
  const tasks = Array.from({ length: count }, async (_, index) => {
    const result = await task(index, controller.signal);
    done += 1;
    context.progress(done / count);
    return result;
  });
  try {
    return await Promise.all(tasks);
  } catch (error) {
    controller.abort(error);
    await Promise.allSettled(tasks);
    throw error;
  } finally {
    context.signal.removeEventListener('abort', stop);
  }
}
