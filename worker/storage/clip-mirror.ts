import fs from 'node:fs';
import path from 'node:path';
import PQueue from 'p-queue';
import type { ObjectStore } from '../../server/core/storage/object-store';
import { filesUnder } from '../../server/core/storage/files-under';
import { objectKeys, WORK_DIR_PREFIX, type StoragePaths } from '../../server/core/storage/paths';
import { REMOVING_PREFIX } from '../../server/core/storage/remove-folder';

/** Objects copied at once each way: enough to hide a bucket's round trips, few enough not to crowd the network. */
const TRANSFERS_AT_ONCE = 8;

/**
 * A worker's local copy of one clip's stored files, for the stages, which read and write files by path. Beside the
 * storage folder the stages work on the stored files themselves and every call here does nothing. Beside a bucket
 * the clip is copied into the worker's scratch folder before its stages run, each stage's outputs are published
 * before the stage commits, and the copy is removed when the job ends: a worker never reads another machine's disk.
 */
export interface ClipMirror {
  /** Replaces the local copy with the clip's stored files; the source only when `source` (only sample reads it). */
  pull(clipId: number, options: { source: boolean }): Promise<void>;
  /**
   * Makes the store hold the local copy's derived files: uploads what is new or changed since the pull or the last
   * push and removes what the stage replaced or removed. Keys are the layout's, so a stage run twice overwrites its
   * objects instead of adding new ones.
   */
  push(clipId: number): Promise<void>;
  /** Removes the local copy. */
  release(clipId: number): Promise<void>;
}

/** The mirror for a worker's store: nothing to do over the storage folder, copies in `local` beside a bucket. */
export function createClipMirror(store: ObjectStore, local: StoragePaths): ClipMirror {
  if (store.kind === 'folder') {
    return { pull: async () => {}, push: async () => {}, release: async () => {} };
  }
  /** Per clip: each local file the store holds as it is now, by key, with the size and time it had then. */
  const published = new Map<number, Map<string, FileMark>>();
  const place = (key: string) => path.join(local.root, ...key.split('/'));

  return {
    async pull(clipId, { source }) {
      await fs.promises.rm(local.clipDir(clipId), { recursive: true, force: true });
      const marks = new Map<string, FileMark>();
      const queue = new PQueue({ concurrency: TRANSFERS_AT_ONCE });
      for (const object of await store.list(objectKeys.clipDir(clipId))) {
        if (!isDerived(clipId, object.key) && !(source && isSource(clipId, object.key))) continue;
        void queue.add(async () => {
          if (!(await store.getFile(object.key, place(object.key)))) return;
          if (isDerived(clipId, object.key)) marks.set(object.key, await markOf(place(object.key)));
        });
      }
      await queue.onIdle();
      published.set(clipId, marks);
    },

    async push(clipId) {
      const before = published.get(clipId) ?? new Map<string, FileMark>();
      const now = new Map<string, FileMark>();
      for (const file of await filesUnder(local.clipDir(clipId))) {
        const key = path.relative(local.root, file).split(path.sep).join('/');
        if (isDerived(clipId, key)) now.set(key, await markOf(file));
      }
      const queue = new PQueue({ concurrency: TRANSFERS_AT_ONCE });
      for (const [key, mark] of now) {
        const old = before.get(key);
        if (old?.size === mark.size && old.mtimeMs === mark.mtimeMs) continue;
        void queue.add(() => store.putFile(key, place(key)));
      }
      for (const key of before.keys()) if (!now.has(key)) void queue.add(() => store.delete(key));
      await queue.onIdle();
      published.set(clipId, now);
    },

    async release(clipId) {
      published.delete(clipId);
      await fs.promises.rm(local.clipDir(clipId), { recursive: true, force: true });
    },
  };
}

interface FileMark {
  size: number;
  mtimeMs: number;
}

async function markOf(file: string): Promise<FileMark> {
  const stat = await fs.promises.stat(file);
  return { size: stat.size, mtimeMs: stat.mtimeMs };
}

function isSource(clipId: number, key: string): boolean {
  return key.startsWith(`${objectKeys.clipDir(clipId)}/source.`);
}

/** A derived file of the clip: not its source, a stage's work folder, a folder being removed or a partial write. */
function isDerived(clipId: number, key: string): boolean {
  const parts = key.slice(objectKeys.clipDir(clipId).length + 1).split('/');
  return (
    !isSource(clipId, key) &&
    !parts.some((part) => part.startsWith(WORK_DIR_PREFIX) || part.startsWith(REMOVING_PREFIX)) &&
    !key.endsWith('.partial')
  );
}

