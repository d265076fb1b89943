import { Clip, UsageSnapshot } from '../../server/core/models';
import { recordAudit } from '../../server/core/audit/audit';
import { joinKey } from '../../server/core/storage/object-store';
import { objectKeys } from '../../server/core/storage/paths';
import { REMOVING_PREFIX } from '../../server/core/storage/remove-folder';
import { emptyUsage, storedUsageByClip, type StoredFolder } from '../../server/core/storage/stored-usage';
import { heldBytes } from '../../server/core/usage/derived-bytes';
import type { Handler } from './handler';

/** A stored clip folder without a clip row is removed once nothing was written to it for this long. */
const STRAY_AFTER_MS = 15 * 60_000;

export interface UsageDrift {
  /** Clips whose recorded bytes differed from the store, with both figures. */
  clips: { clipId: number; recordedBytes: number; actualBytes: number }[];
  /**
   * Stored clip folders with no clip row (left by a crash between a delete's commit and its file removal, or by a
   * worker that published a deleted clip's outputs) and folders a crash left half removed: removed.
   */
  strayFolders: { folder: string; bytes: number }[];
}

/** Today's date in UTC, the key of the daily snapshot. */
export function utcDay(now = new Date()): string {
  return now.toISOString().slice(0, 10);
}

/**
 * Compares the bytes the database records per clip with what the store holds (the storage folder or a bucket):
 * fixes each clip's `storedBytes`, removes stored clip folders that have no clip, and records today's usage by
 * kind. The store is measured before the one short transaction that writes the results.
 */
export const reconcileUsage: Handler<'reconcile-usage'> = {
  async run({ payload }, { store, signal }) {
    // A stopping worker gives the job back between its long steps (on 100,000 clips each takes seconds). Records
    // change only in the closing transaction, which a stop rolls back whole; a stray folder already removed stays
    // removed, as the next run would remove it anyway.
    // The rows are read before the store is measured. A size that processing or compaction records after this read
    // no longer matches the figure read here, so the closing write leaves it alone; one recorded before the read
    // is older than the measurement. Read after measuring, a size recorded in between would be overwritten with a
    // measurement of the folder mid-change.
    const clips = await Clip.findAll({
      attributes: ['id', 'storedBytes', 'state', 'sizeBytes', 'predictedDerivedBytes'],
    });
    signal.throwIfAborted();
    const stored = await storedUsageByClip(store);
    signal.throwIfAborted();
    const known = new Set(clips.map((clip) => clip.id));
    // An admission moves the source under the clip's id before its row commits: a folder written to lately may be
    // such a clip, and waits for the next run.
    const settled = (folder: StoredFolder) => folder.newestMs < Date.now() - STRAY_AFTER_MS;
    const byKind = emptyUsage();
    const drift: UsageDrift = { clips: [], strayFolders: [] };
    const fixes: { id: number; recorded: number; bytes: number }[] = [];
    for (const clip of clips) {
      const usage = stored.clips.get(clip.id) ?? { byKind: emptyUsage(), total: 0 };
      for (const [kind, bytes] of Object.entries(usage.byKind)) byKind[kind as keyof typeof byKind] += bytes;
      const held = heldBytes(clip, usage.total, clip.state !== 'queued' && clip.state !== 'processing');
      if (held !== Number(clip.storedBytes)) {
        drift.clips.push({ clipId: clip.id, recordedBytes: Number(clip.storedBytes), actualBytes: usage.total });
        fixes.push({ id: clip.id, recorded: Number(clip.storedBytes), bytes: held });
      }
    }
    const strays = [
      ...[...stored.clips]
        .filter(([clipId, folder]) => !known.has(clipId) && settled(folder))
        .map(([clipId, folder]) => [String(clipId), folder] as const),
      // A clip delete renames the folder before removing it; a crash in between leaves the renamed folder behind.
      ...[...stored.others].filter(([name]) => name.startsWith(REMOVING_PREFIX)),
    ];
    for (const [folder, { total: bytes }] of strays) {
      signal.throwIfAborted();
      drift.strayFolders.push({ folder: `clips/${folder}`, bytes });
      await store.delete(joinKey(objectKeys.clipsDir, folder));
    }
    byKind.pairsets = await store.size(objectKeys.pairsetsDir);
    const totalBytes = Object.values(byKind).reduce((sum, bytes) => sum + bytes, 0);
    await Clip.sequelize!.transaction(async (transaction) => {
      // Only where nothing recorded a new size since the rows were read: processing or compaction may have changed
      // the folder and written its size while this job measured, and their figure is the newer one.
      for (const fix of fixes) {
        signal.throwIfAborted();
        await Clip.update(
          { storedBytes: fix.bytes },
          { where: { id: fix.id, storedBytes: fix.recorded }, transaction, silent: true },
        );
      }
      const day = utcDay();
      const snapshot = { day, totalBytes, byKind, drift: { ...drift }, takenAt: new Date() };
      const existing = await UsageSnapshot.findOne({ where: { day }, transaction });
      if (existing) await existing.update(snapshot, { transaction });
      else await UsageSnapshot.create(snapshot, { transaction });
      await recordAudit(
        {
          actorId: null,
          action: 'usage.reconcile',
          targetType: 'storage',
          targetId: null,
          detail: {
            reason: payload.reason,
            totalBytes,
            driftClips: drift.clips.length,
            strayFolders: drift.strayFolders.length,
          },
        },
        transaction,
      );
    });
  },
  async recordFailure() {
    // The job row keeps the error for the jobs screen; nothing else needs telling.
  },
};
