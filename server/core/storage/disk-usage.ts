import fs from 'node:fs';
import path from 'node:path';
import type { UsageByKind, UsageKind } from '../../../shared/types/admin';

/** Bytes of every file under `dir` (0 when it does not exist). */
export async function folderBytes(dir: string): Promise<number> {
  const entries = await fs.promises.readdir(dir, { withFileTypes: true }).catch(() => []);
  let total = 0;
  for (const entry of entries) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) total += await folderBytes(full);
    else if (entry.isFile()) total += (await fs.promises.stat(full).catch(() => ({ size: 0 }))).size;
  }
  return total;
}

/** Which usage kind a top-level entry of a clip folder belongs to; stage work folders are not counted. */
function kindOfEntry(name: string): UsageKind | null {
  if (name.startsWith('source.')) return 'source';
  if (name === 'preview.mp4' || name === 'thumbs') return 'preview';
  if (name === 'frames' || name === 'motion' || name === 'views') return name;
  return null;
}

export function emptyUsage(): UsageByKind {
  return { source: 0, preview: 0, frames: 0, motion: 0, views: 0, pairsets: 0 };
}

/** One clip folder's bytes by kind (DESIGN §6 layout). */
export async function clipFolderUsage(dir: string): Promise<{ byKind: UsageByKind; total: number }> {
  const byKind = emptyUsage();
  const entries = await fs.promises.readdir(dir, { withFileTypes: true }).catch(() => []);
  for (const entry of entries) {
    const kind = kindOfEntry(entry.name);
    if (!kind) continue;
    const full = path.join(dir, entry.name);
    byKind[kind] += entry.isDirectory() ? await folderBytes(full) : (await fs.promises.stat(full)).size;
  }
  return { byKind, total: Object.values(byKind).reduce((sum, bytes) => sum + bytes, 0) };
}
