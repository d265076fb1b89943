import fs from 'node:fs';
import path from 'node:path';

const GONE = new Set(['ENOENT', 'ENOTDIR']);

/**
 * Every file under `dir`, at any depth, in a tree that other processes change meanwhile. Node's recursive
 * `readdir` fails whole with ENOENT when any folder in the tree is removed or renamed during the walk (a stage
 * publishing its outputs, compaction removing a clip's stored views); taken as "no files", that listing measured
 * every clip of the store at 0 bytes. Here a folder gone mid-walk is skipped, as its files are gone with it; a
 * missing `dir` holds no files; any other error is thrown.
 */
export async function filesUnder(dir: string): Promise<string[]> {
  const files: string[] = [];
  const pending = [dir];
  for (let folder = pending.pop(); folder !== undefined; folder = pending.pop()) {
    let entries: fs.Dirent[];
    try {
      entries = await fs.promises.readdir(folder, { withFileTypes: true });
    } catch (error) {
      if (GONE.has((error as NodeJS.ErrnoException).code ?? '')) continue;
      throw error;
    }
    for (const entry of entries) {
      const full = path.join(folder, entry.name);
      if (entry.isDirectory()) pending.push(full);
      else if (entry.isFile()) files.push(full);
    }
  }
  return files;
}
