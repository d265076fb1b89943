import fs from 'node:fs';
import path from 'node:path';
import { decodeFlo } from '../../shared/motion/formats/flo';
import { readRgbImage, writeLosslessWebp } from '../../server/core/media/frame-images';
import { encodePackedField } from '../../server/core/media/packed-field';
import { originalOnlyFiles, removeStoredViews } from '../../server/core/storage/original-format';
import type { StoragePaths } from '../../server/core/storage/paths';
import { CONSISTENCY_DEFAULTS, forwardBackwardConsistency } from '../motion/fields/consistency';
import { openWorkDir, removeLeftoverWorkDirs } from '../pipeline/work-dir';

/** Frame and field files are named by their six-digit index (storage/paths.ts). */
const FRAME_FILE = /^(\d{6})\.png$/;
const FORWARD_FIELD_FILE = /^(\d{6})\.flo$/;

/**
 * Writes the packed-format files of a clip stored in the original format beside the original ones: each PNG frame
 * as lossless WebP (checked pixel for pixel against the PNG before it counts), each forward .flo as a packed field
 * with the consistency plane computed from the stored backward field as the motion stage computes it. The new files
 * are written in a work folder and renamed in; their names differ from the originals', so until the clip's format
 * is switched readers keep reading the originals. Repeating it after a crash writes the same files again.
 */
export async function writePackedFiles(paths: StoragePaths, clipId: number, signal: AbortSignal): Promise<void> {
  const clipDir = paths.clipDir(clipId);
  const original = paths.clipDerived(clipId, 'original');
  const packed = paths.clipDerived(clipId, 'packed');
  // An attempt killed half way left its work folder; the clip is not being processed, so every work folder is stale.
  await removeLeftoverWorkDirs(clipDir);
  const work = await openWorkDir(clipDir, 'compact');
  try {
    await fs.promises.mkdir(work.layout.framesDir, { recursive: true });
    await fs.promises.mkdir(work.layout.motionDir, { recursive: true });
    for (const index of await indexedFiles(original.framesDir, FRAME_FILE)) {
      signal.throwIfAborted();
      const image = await readRgbImage(original.frame(index));
      await writeLosslessWebp(image.rgb, image.width, image.height, work.layout.frame(index));
      const check = await readRgbImage(work.layout.frame(index));
      if (!Buffer.from(check.rgb).equals(Buffer.from(image.rgb))) {
        throw new Error(`clip ${clipId}: frame ${index} did not survive the WebP conversion unchanged`);
      }
    }
    const backwardField = originalOnlyFiles(clipDir).backwardField;
    for (const index of await indexedFiles(original.motionDir, FORWARD_FIELD_FILE)) {
      signal.throwIfAborted();
      const forward = decodeFlo(await fs.promises.readFile(original.motionField(index)));
      const backwardBytes = await fs.promises.readFile(backwardField(index)).catch(() => null);
      const { width, height } = forward;
      const consistent = backwardBytes
        ? forwardBackwardConsistency(forward.flow, decodeFlo(backwardBytes).flow, width, height, CONSISTENCY_DEFAULTS)
            .mask
        : null;
      await fs.promises.writeFile(work.layout.motionField(index), encodePackedField({ ...forward, consistent }));
    }
    for (const [from, to] of [
      [work.layout.framesDir, packed.framesDir],
      [work.layout.motionDir, packed.motionDir],
    ] as const) {
      await fs.promises.mkdir(to, { recursive: true });
      for (const name of await fs.promises.readdir(from)) {
        await fs.promises.rename(path.join(from, name), path.join(to, name));
      }
    }
  } finally {
    await work.remove();
  }
}

/**
 * Removes what only the original format keeps (PNG frames, .flo fields both ways, motion pictures, stored views)
 * once the clip reads the packed files; safe to repeat.
 */
export async function removeOriginalFiles(paths: StoragePaths, clipId: number): Promise<void> {
  const original = paths.clipDerived(clipId, 'original');
  const remove = async (dir: string, pattern: RegExp) => {
    const names = await fs.promises.readdir(dir).catch(() => [] as string[]);
    await Promise.all(names.filter((name) => pattern.test(name)).map((name) => fs.promises.rm(path.join(dir, name))));
  };
  await remove(original.framesDir, /\.png$/);
  await remove(original.motionDir, /\.(flo|png)$/);
  await removeStoredViews(paths.clipDir(clipId));
}

async function indexedFiles(dir: string, pattern: RegExp): Promise<number[]> {
  const names = await fs.promises.readdir(dir).catch(() => [] as string[]);
  return names.flatMap((name) => {
    const match = pattern.exec(name);
    return match ? [Number(match[1])] : [];
  });
}
