import PQueue from 'p-queue';
import { computed, reactive } from 'vue';
import type { ClipSummary } from '../../shared/types/clips';
import { ApiError } from '../api/http';
import { uploadClip, type UploadHandle } from '../api/clips';

/** Files sent at once: enough to keep the line busy, few enough that each shows steady progress. */
export const PARALLEL_UPLOADS = 3;

export type UploadItemState =
  'waiting' | 'sending' | 'checking' | 'created' | 'duplicate' | 'refused' | 'failed' | 'cancelled';

export interface UploadItem {
  key: number;
  file: File;
  state: UploadItemState;
  sentBytes: number;
  message: string;
  clip: ClipSummary | null;
  duplicateOf: number | null;
  handle: UploadHandle | null;
}

/** Shown while a broken connection is retried; the upload carries on from what the server already holds. */
const RESUMING = 'Connection lost; resuming where it stopped';

let nextKey = 1;

/** A batch of files uploaded one request per file, a few at a time, with progress, cancel and per-file results. */
export function useUploadBatch() {
  const items = reactive<UploadItem[]>([]);
  const queue = new PQueue({ concurrency: PARALLEL_UPLOADS });

  const totalBytes = computed(() =>
    items.filter((item) => item.state !== 'cancelled').reduce((sum, item) => sum + item.file.size, 0),
  );
  const sentBytes = computed(() =>
    items
      .filter((item) => item.state !== 'cancelled')
      .reduce((sum, item) => sum + (isFinished(item) ? item.file.size : item.sentBytes), 0),
  );
  const busy = computed(() => items.some((item) => ['waiting', 'sending', 'checking'].includes(item.state)));

  function add(files: File[]): void {
    for (const file of files) {
      items.push({
        key: nextKey++,
        file,
        state: 'waiting',
        sentBytes: 0,
        message: '',
        clip: null,
        duplicateOf: null,
        handle: null,
      });
    }
  }

  function remove(key: number): void {
    const index = items.findIndex((item) => item.key === key && item.state === 'waiting' && !item.handle);
    if (index >= 0) items.splice(index, 1);
  }

  function start(fields: Record<string, string>): void {
    for (const item of items.filter((entry) => entry.state === 'waiting' && !entry.handle)) {
      item.message = 'Waiting for a free slot';
      void queue.add(() => send(item, fields));
    }
  }

  async function send(item: UploadItem, fields: Record<string, string>): Promise<void> {
    if (item.state === 'cancelled') return;
    item.state = 'sending';
    item.message = '';
    item.handle = uploadClip(fields, item.file, {
      onProgress(sent) {
        item.sentBytes = sent;
        if (item.message === RESUMING) item.message = '';
        // Once every byte is out the server is probing the file; say so rather than sit at 100%.
        if (sent >= item.file.size && item.state === 'sending') item.state = 'checking';
      },
      onInterrupted() {
        if (item.state === 'sending' || item.state === 'checking') item.message = RESUMING;
      },
    });
    try {
      item.clip = await item.handle.done;
      item.state = 'created';
      item.message = `Clip ${item.clip.id} created, queued for processing`;
    } catch (error) {
      settleFailure(item, error);
    }
  }

  function settleFailure(item: UploadItem, error: unknown): void {
    if (error instanceof DOMException && error.name === 'AbortError') {
      item.state = 'cancelled';
      item.message = 'Cancelled';
    } else if (error instanceof ApiError && error.code === 'duplicate_clip') {
      item.state = 'duplicate';
      item.duplicateOf = (error.details as { clipId?: number } | undefined)?.clipId ?? null;
      item.message = error.message;
    } else if (error instanceof ApiError && error.status < 500) {
      item.state = 'refused';
      item.message = error.message;
    } else {
      item.state = 'failed';
      item.message = (error as Error).message;
    }
  }

  /** Cancels a waiting or sending file; once every byte is out the server decides, so it can no longer be taken back. */
  function cancel(item: UploadItem): void {
    if (item.state === 'sending') item.handle?.cancel();
    else if (item.state === 'waiting') {
      item.state = 'cancelled';
      item.message = 'Cancelled';
    }
  }

  function cancelAll(): void {
    for (const item of items) cancel(item);
  }

  function clearFinished(): void {
    for (let i = items.length - 1; i >= 0; i -= 1) if (isFinished(items[i]!)) items.splice(i, 1);
  }

  return { items, totalBytes, sentBytes, busy, add, remove, start, cancel, cancelAll, clearFinished };
}

function isFinished(item: UploadItem): boolean {
  return ['created', 'duplicate', 'refused', 'failed', 'cancelled'].includes(item.state);
}
