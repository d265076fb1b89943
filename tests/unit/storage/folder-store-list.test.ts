import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createFolderStore } from '../../../server/core/storage/folder-store';

/**
 * The folder store's listing is how the usage reconciliation measures every clip, while the worker's stages and
 * compaction rename and remove folders in the same tree. A folder removed during the walk must cost only its own
 * files: Node's recursive readdir fails whole with ENOENT then (Node 20 `fs.promises.readdir`, observed), and a
 * listing taken as empty recorded every clip at 0 bytes.
 */
const FOLDERS = 120;
let root: string;
const clipFolder = (clip: number) => path.join(root, 'clips', String(clip));

function writeClip(clip: number) {
  fs.mkdirSync(path.join(clipFolder(clip), 'frames'), { recursive: true });
  fs.writeFileSync(path.join(clipFolder(clip), 'frames', '000000.webp'), 'frame');
  fs.writeFileSync(path.join(clipFolder(clip), 'source.mp4'), 'source');
}

beforeAll(() => {
  root = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-list-'));
  for (let clip = 0; clip < FOLDERS; clip += 1) writeClip(clip);
});
afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

describe('listing the storage folder while folders in it go', () => {
  it("loses only the removed folder's files, every time", async () => {
    const store = createFolderStore(root);
    for (let attempt = 0; attempt < 40; attempt += 1) {
      // The walk starts, and a clip's folder is removed a few turns of the event loop later: after the walk has read
      // the names under clips/ and before it reads that clip's folder (it takes thousands of turns).
      const gone = FOLDERS - 1 - attempt;
      const listing = store.list('clips');
      for (let turn = 0; turn < 4 + (attempt % 12); turn += 1) await new Promise((next) => setImmediate(next));
      fs.rmSync(clipFolder(gone), { recursive: true });
      const keys = new Set((await listing).map((object) => object.key));
      writeClip(gone);
      for (let other = 0; other < FOLDERS; other += 1) {
        if (other === gone) continue;
        expect(keys.has(`clips/${other}/source.mp4`)).toBe(true);
        expect(keys.has(`clips/${other}/frames/000000.webp`)).toBe(true);
      }
    }
  });

  it('answers an empty list for a prefix that is not there', async () => {
    expect(await createFolderStore(root).list('clips/none')).toEqual([]);
  });
});
