import fs from 'node:fs';
import path from 'node:path';
import type { Config } from '../../server/core/config';
import type { ObjectStore } from '../../server/core/storage/object-store';
import { storagePaths, type StoragePaths } from '../../server/core/storage/paths';
import { createClipMirror, type ClipMirror } from './clip-mirror';

/** Where a worker's jobs find stored files (`store`) and where they work on local copies (`paths`, `mirror`). */
export interface WorkerStorage {
  store: ObjectStore;
  /** The stages' local layout: the storage folder itself, or this process's scratch folder beside a bucket. */
  paths: StoragePaths;
  mirror: ClipMirror;
}

const SCRATCH_PREFIX = 'worker-';

/**
 * The worker's storage for its store. Beside a bucket each worker process has a scratch folder of its own under
 * KINEFOLD_SCRATCH_DIR (`worker-<pid>`), so several workers on one machine never share a local copy.
 */
export function workerStorage(config: Pick<Config, 'storageDir' | 'scratchDir'>, store: ObjectStore): WorkerStorage {
  const paths = storagePaths(
    store.kind === 'folder' ? config.storageDir : path.join(config.scratchDir, `${SCRATCH_PREFIX}${process.pid}`),
  );
  return { store, paths, mirror: createClipMirror(store, paths) };
}

/**
 * Removes the scratch folders of worker processes of this machine that no longer run (a worker killed mid-job
 * leaves its copies behind), and this process's own from an earlier life under the same pid.
 */
export async function sweepScratch(scratchDir: string): Promise<void> {
  const entries = await fs.promises.readdir(scratchDir).catch(() => [] as string[]);
  for (const name of entries) {
    if (!name.startsWith(SCRATCH_PREFIX)) continue;
    const pid = Number(name.slice(SCRATCH_PREFIX.length));
    if (Number.isInteger(pid) && pid !== process.pid && isRunning(pid)) continue;
    await fs.promises.rm(path.join(scratchDir, name), { recursive: true, force: true });
  }
}

function isRunning(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    // EPERM: a process of another user has that pid, so it runs (and is not ours to clean up after).
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}
