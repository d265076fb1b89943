import fs from 'node:fs';
import path from 'node:path';
import { Clip, UsageSnapshot } from '../../server/core/models';
import { recordAudit } from '../../server/core/audit/audit';
import { clipFolderUsage, emptyUsage, folderBytes } from '../../server/core/storage/disk-usage';
import { heldBytes } from '../../server/core/usage/derived-bytes';
import { REMOVING_PREFIX } from '../../server/core/storage/remove-folder';
import type { Handler } from './handler';

export interface UsageDrift {
  /** Clips whose recorded bytes differed from the disk, with both figures. */
  clips: { clipId: number; recordedBytes: number; actualBytes: number }[];
  /** Clip folders with no clip row (left by a crash between a delete's commit and its file removal): removed. */
  strayFolders: { folder: string; bytes: number }[];
}

/** Today's date in UTC, the key of the daily snapshot. */
export function utcDay(now = new Date()): string {
  return now.toISOString().slice(0, 10);
}

/**
 * Compares the bytes the database records per clip with the files on disk: fixes each clip's `storedBytes`,
 * removes clip folders that have no clip (and folders a crash left half-removed), and records today's usage by kind. Files are measured before the one
 * short transaction that writes the results.
 */
export const reconcileUsage: Handler<'reconcile-usage'> = {
  async run({ payload }, { paths }) {
    const entries = await fs.promises.readdir(paths.clipsDir).catch(() => [] as string[]);
    const folders = entries.filter((name) => /^\d+$/.test(name));
    // A clip delete renames the folder before removing it; a crash in between leaves the renamed folder behind.
    const halfRemoved = entries.filter((name) => name.startsWith(REMOVING_PREFIX));
    const clips = await Clip.findAll({
      attributes: ['id', 'storedBytes', 'state', 'sizeBytes', 'predictedDerivedBytes'],
    });
    const known = new Set(clips.map((clip) => clip.id));
    const byKind = emptyUsage();
    const drift: UsageDrift = { clips: [], strayFolders: [] };
    const fixes: { id: number; recorded: number; bytes: number }[] = [];
    for (const clip of clips) {
      const usage = await clipFolderUsage(paths.clipDir(clip.id));
      for (const [kind, bytes] of Object.entries(usage.byKind)) byKind[kind as keyof typeof byKind] += bytes;
      const held = heldBytes(clip, usage.total, clip.state !== 'queued' && clip.state !== 'processing');
      if (held !== Number(clip.storedBytes)) {
        drift.clips.push({ clipId: clip.id, recordedBytes: Number(clip.storedBytes), actualBytes: usage.total });
        fixes.push({ id: clip.id, recorded: Number(clip.storedBytes), bytes: held });
      }
    }
    for (const folder of folders.filter((name) => !known.has(Number(name)))) {
      const dir = paths.clipDir(Number(folder));
      drift.strayFolders.push({ folder: `clips/${folder}`, bytes: await folderBytes(dir) });
      await fs.promises.rm(dir, { recursive: true, force: true });
    }
    for (const name of halfRemoved) {
      const dir = path.join(paths.clipsDir, name);
      drift.strayFolders.push({ folder: `clips/${name}`, bytes: await folderBytes(dir) });
      await fs.promises.rm(dir, { recursive: true, force: true });
    }
    byKind.pairsets = await folderBytes(paths.pairsetsDir);
    const totalBytes = Object.values(byKind).reduce((sum, bytes) => sum + bytes, 0);
    await Clip.sequelize!.transaction(async (transaction) => {
      // Only where nothing recorded a new size since it was read: processing or compaction may have changed the
      // folder and written its size while this job measured, and their figure is the newer one.
      for (const fix of fixes) {
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
