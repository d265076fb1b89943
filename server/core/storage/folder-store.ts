import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Readable } from 'node:stream';
import {
  StoreNotUsable,
  type ByteRange,
  type ObjectHead,
  type ObjectRead,
  type ObjectStore,
  type StoredObject,
} from './object-store';
import { filesUnder } from './files-under';
import { removeFolder } from './remove-folder';

/**
 * The default store: objects are files under one folder, keys their relative paths. Moves are renames, so
 * admitting an upload or publishing a stage's outputs costs one metadata step, as before there was a choice.
 */
export function createFolderStore(folder: string): ObjectStore {
  const root = path.resolve(folder);
  const place = (key: string) => {
    const full = path.resolve(root, key);
    // Keys are built from ids (paths.ts); this only stops a future mistake from reaching outside the root.
    if (full !== root && !full.startsWith(root + path.sep)) throw new Error(`Storage key "${key}" leaves the store.`);
    return full;
  };

  async function writeAtomically(key: string, write: (temp: string) => Promise<void>): Promise<void> {
    const file = place(key);
    await fs.promises.mkdir(path.dirname(file), { recursive: true });
    const temp = `${file}.${randomUUID().slice(0, 8)}.partial`;
    try {
      await write(temp);
      await fs.promises.rename(temp, file);
    } finally {
      await fs.promises.rm(temp, { force: true });
    }
  }

  async function head(key: string): Promise<ObjectHead | null> {
    const stat = await fs.promises.stat(place(key)).catch(() => null);
    return stat?.isFile() ? headOf(stat) : null;
  }

  async function get(key: string, range?: ByteRange): Promise<ObjectRead | null> {
    // Opened first, then measured: a rename or removal after this point cannot mix two versions of the file.
    const handle = await fs.promises.open(place(key), 'r').catch(() => null);
    if (!handle) return null;
    const stat = await handle.stat();
    if (!stat.isFile()) {
      await handle.close();
      return null;
    }
    const body = handle.createReadStream(range ? { start: range.start, end: range.end } : {});
    return { ...headOf(stat), body, range: range ?? null };
  }

  async function list(prefix: string): Promise<StoredObject[]> {
    const start = place(prefix);
    const stat = await fs.promises.stat(start).catch(() => null);
    if (!stat) return [];
    if (stat.isFile()) return [{ key: toKey(start), size: stat.size, modified: stat.mtime }];
    const found: StoredObject[] = [];
    for (const full of await filesUnder(start)) {
      const entryStat = await fs.promises.stat(full).catch(() => null);
      if (entryStat) found.push({ key: toKey(full), size: entryStat.size, modified: entryStat.mtime });
    }
    return found.sort((a, b) => a.key.localeCompare(b.key));
  }
  const toKey = (full: string) => path.relative(root, full).split(path.sep).join('/');

  return {
    kind: 'folder',
    location: root,
    async ready() {
      try {
        await fs.promises.mkdir(root, { recursive: true });
        await fs.promises.access(root, fs.constants.W_OK);
      } catch (error) {
        throw new StoreNotUsable(`KINEFOLD_STORAGE_DIR: ${root} cannot be written (${(error as Error).message}).`);
      }
    },
    async putFile(key, file, options = {}) {
      const target = place(key);
      if (path.resolve(file) === target) return;
      await fs.promises.mkdir(path.dirname(target), { recursive: true });
      if (options.move) {
        try {
          await fs.promises.rename(file, target);
          return;
        } catch (error) {
          if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error;
        }
      }
      await writeAtomically(key, (temp) => fs.promises.copyFile(file, temp));
      if (options.move) await fs.promises.rm(file, { force: true });
    },
    putStream: (key, body: Readable) => writeAtomically(key, (temp) => pipeline(body, fs.createWriteStream(temp))),
    putBytes: (key, bytes) => writeAtomically(key, (temp) => fs.promises.writeFile(temp, bytes)),
    get,
    async getBytes(key) {
      return fs.promises.readFile(place(key)).catch((error: NodeJS.ErrnoException) => {
        if (error.code === 'ENOENT' || error.code === 'EISDIR') return null;
        throw error;
      });
    },
    async getFile(key, file) {
      const read = await get(key);
      if (!read) return false;
      await fs.promises.mkdir(path.dirname(file), { recursive: true });
      await pipeline(read.body, fs.createWriteStream(file));
      return true;
    },
    head,
    async move(fromKey, toKey) {
      const target = place(toKey);
      await fs.promises.mkdir(path.dirname(target), { recursive: true });
      await fs.promises.rename(place(fromKey), target);
    },
    list,
    async delete(prefix) {
      const full = place(prefix);
      const stat = await fs.promises.stat(full).catch(() => null);
      if (stat?.isDirectory()) await removeFolder(full);
      else if (stat) await fs.promises.rm(full, { force: true });
    },
    async size(prefix) {
      return (await list(prefix)).reduce((sum, object) => sum + object.size, 0);
    },
  };
}

/** A weak tag from size and modification time, as express's sendFile makes: a rename into place changes both. */
function headOf(stat: fs.Stats): ObjectHead {
  return { size: stat.size, etag: `W/"${stat.size.toString(16)}-${stat.mtimeMs.toString(16)}"`, modified: stat.mtime };
}
