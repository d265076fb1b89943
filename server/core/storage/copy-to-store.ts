import type { ObjectStore } from './object-store';
import { objectKeys, WORK_DIR_PREFIX } from './paths';
import { REMOVING_PREFIX } from './remove-folder';

export interface CopyTally {
  copied: number;
  /** Already in the target with the same size: a previous run's work. */
  skipped: number;
  copiedBytes: number;
}

/**
 * Copies what a folder installation keeps (clips' sources and derived files, built pairsets) into another store,
 * object by object. Resumable and idempotent: an object already in the target at the same size is skipped, and
 * both stores only ever show whole objects (a rename into place; an S3 upload appears when complete), so a run
 * stopped anywhere leaves nothing half-copied that a later run would trust. Stage work folders, folders being
 * removed and partial writes are not copied: they are nobody's data.
 */
export async function copyIntoStore(
  from: ObjectStore,
  to: ObjectStore,
  onObject: (key: string, tally: CopyTally) => void = () => {},
): Promise<CopyTally> {
  const tally: CopyTally = { copied: 0, skipped: 0, copiedBytes: 0 };
  for (const prefix of [objectKeys.clipsDir, objectKeys.pairsetsDir]) {
    for (const object of await from.list(prefix)) {
      if (!isKept(object.key)) continue;
      const there = await to.head(object.key);
      if (there?.size === object.size) {
        tally.skipped += 1;
        continue;
      }
      const read = await from.get(object.key);
      // Removed since the listing (a clip deleted meanwhile): nothing to copy.
      if (!read) continue;
      await to.putStream(object.key, read.body);
      tally.copied += 1;
      tally.copiedBytes += object.size;
      onObject(object.key, tally);
    }
  }
  return tally;
}

function isKept(key: string): boolean {
  const parts = key.split('/');
  return (
    !parts.some((part) => part.startsWith(WORK_DIR_PREFIX) || part.startsWith(REMOVING_PREFIX)) &&
    !key.endsWith('.partial')
  );
}
