import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { derivedLayout, WORK_DIR_PREFIX, type DerivedLayout } from '../../server/core/storage/paths';

/**
 * A stage's private folder inside the clip folder. The stage writes its outputs here under the clip's own layout,
 * then each output is renamed into place: a file replaces its old self in one rename; a folder swaps with its old
 * self in two, and the old one leaves with the work folder. A crash leaves at worst a work folder, removed by name
 * at the next attempt, and never a half-written output in the clip's layout.
 */
export interface WorkDir {
  dir: string;
  layout: DerivedLayout;
  /** Renames each named output of the work folder into the same place under `target`. */
  moveIntoPlace(target: DerivedLayout, outputs: readonly OutputName[]): Promise<void>;
  remove(): Promise<void>;
}

export type OutputName = 'preview' | 'framesDir' | 'thumbsDir' | 'motionDir';

export async function openWorkDir(clipDir: string, stage: string): Promise<WorkDir> {
  const dir = path.join(clipDir, `${WORK_DIR_PREFIX}${stage}-${randomUUID().slice(0, 8)}`);
  await fs.promises.mkdir(dir, { recursive: true });
  const layout = derivedLayout(dir);
  return {
    dir,
    layout,
    async moveIntoPlace(target, outputs) {
      for (const output of outputs) {
        const from = layout[output];
        const to = target[output];
        if (output !== 'preview') await moveAside(to, path.join(dir, `replaced-${path.basename(to)}`));
        await fs.promises.rename(from, to);
      }
    },
    remove: () => fs.promises.rm(dir, { recursive: true, force: true }),
  };
}

/** Removes the work folders an interrupted attempt left in a clip folder. */
export async function removeLeftoverWorkDirs(clipDir: string): Promise<void> {
  const entries = await fs.promises.readdir(clipDir).catch(() => [] as string[]);
  await Promise.all(
    entries
      .filter((name) => name.startsWith(WORK_DIR_PREFIX))
      .map((name) => fs.promises.rm(path.join(clipDir, name), { recursive: true, force: true })),
  );
}

async function moveAside(from: string, to: string): Promise<void> {
  try {
    await fs.promises.rename(from, to);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
  }
}
