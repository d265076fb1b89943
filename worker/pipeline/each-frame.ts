import { setMaxListeners } from 'node:events';
import type { StageContext } from './stage';

/**
 * Runs `task` for frames 0..count−1 at once (the frame pool queues them onto its threads), reports the share
 * done as tasks finish, and at the first failure aborts the tasks still waiting.
 */
export async function forEachFrame<R>(
  count: number,
  context: Pick<StageContext, 'signal' | 'progress'>,
  task: (index: number, signal: AbortSignal) => Promise<R>,
): Promise<R[]> {
  const controller = new AbortController();
  // Every queued task listens on this one signal.
  setMaxListeners(0, controller.signal);
  const stop = () => controller.abort(context.signal.reason);
  context.signal.addEventListener('abort', stop, { once: true });
  let done = 0;
  try {
    return await Promise.all(
      Array.from({ length: count }, async (_, index) => {
        const result = await task(index, controller.signal);
        done += 1;
        context.progress(done / count);
        return result;
      }),
    );
  } catch (error) {
    controller.abort(error);
    throw error;
  } finally {
    context.signal.removeEventListener('abort', stop);
  }
}
