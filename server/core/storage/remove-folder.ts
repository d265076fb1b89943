import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

/**
 * Removes a folder another process may still be writing into (a clip folder while the worker samples it).
 * A recursive delete alone races with the writer: a file created after the folder was listed makes the last
 * rmdir fail with ENOTEMPTY. Renaming the folder first takes its name away in one step, so new files can no longer
 * land in it (the writer's next open fails and the worker stops, seeing the clip gone); the renamed folder is then
 * removed at leisure. The dot name keeps it out of every listing of clip folders (`^\d+$`).
 */
/** The name a folder takes while it is removed; one left by a crash mid-removal is swept by reconcile-usage. */
export const REMOVING_PREFIX = '.removing-';

export async function removeFolder(dir: string): Promise<void> {
  const doomed = path.join(path.dirname(dir), `${REMOVING_PREFIX}${path.basename(dir)}-${randomUUID().slice(0, 8)}`);
  try {
    await fs.promises.rename(dir, doomed);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return;
    throw error;
  }
  await fs.promises.rm(doomed, { recursive: true, force: true, maxRetries: 5, retryDelay: 50 });
}
