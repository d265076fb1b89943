import fs from 'node:fs';
import path from 'node:path';
import { frameName } from './paths';

/**
 * Files of the `original` derived format that the `packed` one no longer keeps (storage/paths.ts): stored luma and
 * chroma views, backward fields and motion pictures. Only the compact-storage job and reprocessing look at them,
 * to convert or remove them.
 */
export function originalOnlyFiles(clipDir: string) {
  const motionDir = path.join(clipDir, 'motion');
  return {
    viewsDir: path.join(clipDir, 'views'),
    backwardField: (index: number) => path.join(motionDir, `${frameName(index)}.back.flo`),
    motionPicture: (index: number) => path.join(motionDir, `${frameName(index)}.png`),
  };
}

/** Removes the stored views of the original format; safe to call again and on a clip that never had them. */
export async function removeStoredViews(clipDir: string): Promise<void> {
  await fs.promises.rm(originalOnlyFiles(clipDir).viewsDir, { recursive: true, force: true });
}
