import fs from 'node:fs';
import path from 'node:path';
import { Op } from 'sequelize';
import { UploadReservation } from '../models';
import type { StoragePaths } from '../storage/paths';

/** An upload in flight for longer than this died with its connection or with a server that stopped. */
export const STALE_UPLOAD_MS = 60 * 60_000;

/**
 * Removes partial uploads begun before `before` (by default an hour ago) from `incoming/` and releases the bytes
 * their reservations still hold, so a crash mid-upload costs neither disk nor quota.
 */
export async function cleanStaleUploads(
  paths: StoragePaths,
  { before = Date.now() - STALE_UPLOAD_MS }: { before?: number } = {},
): Promise<{ files: number; reservations: number }> {
  const cutoff = before;
  let files = 0;
  const entries = await fs.promises.readdir(paths.incomingDir).catch(() => [] as string[]);
  for (const entry of entries) {
    const file = path.join(paths.incomingDir, entry);
    const stat = await fs.promises.stat(file).catch(() => null);
    if (stat && stat.mtimeMs < cutoff) {
      await fs.promises.rm(file, { recursive: true, force: true });
      files += 1;
    }
  }
  const reservations = await UploadReservation.destroy({ where: { createdAt: { [Op.lt]: new Date(cutoff) } } });
  return { files, reservations };
}
