import { onBeforeUnmount, reactive, watch } from 'vue';
import type { ClipState } from '../../shared/clip-states';
import type { ClipProgress } from '../../shared/types/frames';
import { getProgress } from '../api/clip-media';
import type { UploadItem } from './useUploadBatch';

const POLL_MS = 2000;
/** Polls in a row that may fail (a clip deleted meanwhile) before a clip is no longer followed. */
const MAX_MISSES = 3;
const ACTIVE: ClipState[] = ['queued', 'processing'];

/**
 * Processing progress of every clip the batch created, by clip id, polled until each has left the queue, so the
 * upload list shows what happens after the bytes have arrived.
 */
export function useBatchProcessing(items: UploadItem[]): Record<number, ClipProgress> {
  const progress = reactive<Record<number, ClipProgress>>({});
  let timer: ReturnType<typeof setTimeout> | undefined;
  const misses: Record<number, number> = {};
  let stopped = false;

  const following = () =>
    items
      .map((item) => item.clip?.id)
      .filter(
        (id): id is number =>
          id !== undefined && (misses[id] ?? 0) < MAX_MISSES && (!progress[id] || ACTIVE.includes(progress[id].state)),
      );

  async function poll(): Promise<void> {
    timer = undefined;
    await Promise.all(
      following().map(async (id) => {
        try {
          progress[id] = await getProgress(id);
          misses[id] = 0;
        } catch {
          misses[id] = (misses[id] ?? 0) + 1;
        }
      }),
    );
    if (!stopped && following().length > 0) timer = setTimeout(poll, POLL_MS);
  }

  watch(
    () => following().length,
    (count) => {
      if (count > 0 && timer === undefined && !stopped) timer = setTimeout(poll, POLL_MS);
    },
  );
  onBeforeUnmount(() => {
    stopped = true;
    clearTimeout(timer);
  });
  return progress;
}
