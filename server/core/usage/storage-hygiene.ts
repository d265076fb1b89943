import fs from 'node:fs';
import path from 'node:path';
import { Op } from 'sequelize';
import { UploadReservation } from '../models';
import { RESUMABLE_DIR, type StoragePaths } from '../storage/paths';
import { releaseUpload } from './quotas';

/** An upload in flight for longer than this died with its connection or with a server that stopped. */
export const STALE_UPLOAD_MS = 60 * 60_000;

/** Resumable upload ids are UUIDs; anything else in their folder is not ours to judge. */
const UPLOAD_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/**
 * Removes partial uploads begun before `before` (by default an hour ago) from `incoming/` and releases the bytes
 * their reservations still hold, so a crash mid-upload costs neither disk nor quota. Resumable uploads are left
 * alone: they are meant to outlive a broken connection or a restart, and expireResumableUploads judges them.
 */
export async function cleanStaleUploads(
  paths: StoragePaths,
  { before = Date.now() - STALE_UPLOAD_MS }: { before?: number } = {},
): Promise<{ files: number; reservations: number }> {
  const cutoff = before;
  let files = 0;
  const entries = await fs.promises.readdir(paths.incomingDir).catch(() => [] as string[]);
  for (const entry of entries) {
    if (entry === RESUMABLE_DIR) continue;
    const file = path.join(paths.incomingDir, entry);
    const stat = await fs.promises.stat(file).catch(() => null);
    if (stat && stat.mtimeMs < cutoff) {
      await fs.promises.rm(file, { recursive: true, force: true });
      files += 1;
    }
  }
  const resumable = await resumableUploadIds(paths);
  const reservations = await UploadReservation.destroy({
    where: { createdAt: { [Op.lt]: new Date(cutoff) }, id: { [Op.notIn]: [...resumable] } },
  });
  return { files, reservations };
}

/**
 * Removes resumable uploads that received no byte for `idleMs` (their files and what they declared) and releases
 * their reservations: an upload given up in the field must not hold quota or disk for ever.
 */
export async function expireResumableUploads(
  paths: StoragePaths,
  { idleMs, now = Date.now() }: { idleMs: number; now?: number },
): Promise<{ uploads: number }> {
  let uploads = 0;
  for (const id of await resumableUploadIds(paths)) {
    const files = [paths.resumableFile(id), paths.resumableInfo(id)];
    const touched = await Promise.all(
      files.map((file) =>
        fs.promises.stat(file).then(
          (stat) => stat.mtimeMs,
          () => 0,
        ),
      ),
    );
    if (now - Math.max(...touched) < idleMs) continue;
    for (const file of files) await fs.promises.rm(file, { force: true });
    await releaseUpload(id);
    uploads += 1;
  }
  return { uploads };
}

async function resumableUploadIds(paths: StoragePaths): Promise<Set<string>> {
  const entries = await fs.promises.readdir(paths.resumableDir).catch(() => [] as string[]);
  return new Set(entries.map((entry) => entry.replace(/\.json$/, '')).filter((id) => UPLOAD_ID.test(id)));
}
