import fs from 'node:fs';
import { readRgbImage, type RgbImage } from '../../server/core/media/frame-images';
import { viewCodes, type ViewCodes } from '../../server/core/media/frame-views';
import { readStoredField } from '../../server/core/media/stored-field';
import type { PackedFieldContent } from '../../server/core/media/packed-field';
import type { DerivedFormat, StoragePaths } from '../../server/core/storage/paths';

/** Decoded frames kept at once: a pair reads at most two frames, and the next pair usually one of them again. */
const RECENT_FRAMES = 4;

/**
 * A pairset build's way to the stored frames and fields of its clips, whichever format each clip is stored in.
 * Luma and chroma are derived from the frame (media/frame-views.ts); the last few frames read are kept decoded,
 * so the views and the frame of one moment cost one decode.
 */
export interface ViewReader {
  frameFile(clipId: number, index: number): string;
  fieldFile(clipId: number, index: number): string;
  frame(clipId: number, index: number): Promise<RgbImage>;
  views(clipId: number, index: number): Promise<ViewCodes>;
  field(clipId: number, index: number): Promise<PackedFieldContent>;
}

export function createViewReader(
  paths: StoragePaths,
  clips: ReadonlyMap<number, { derivedFormat: DerivedFormat }>,
): ViewReader {
  const layout = (clipId: number) => paths.clipDerived(clipId, clips.get(clipId)?.derivedFormat ?? 'packed');
  const recent = new Map<string, { image: Promise<RgbImage>; views?: ViewCodes }>();
  const decoded = (clipId: number, index: number) => {
    const key = `${clipId}:${index}`;
    let entry = recent.get(key);
    if (entry) {
      recent.delete(key);
    } else {
      entry = { image: readRgbImage(layout(clipId).frame(index)) };
      entry.image.catch(() => recent.delete(key));
    }
    recent.set(key, entry);
    if (recent.size > RECENT_FRAMES) recent.delete(recent.keys().next().value!);
    return entry;
  };
  return {
    frameFile: (clipId, index) => layout(clipId).frame(index),
    fieldFile: (clipId, index) => layout(clipId).motionField(index),
    frame: (clipId, index) => decoded(clipId, index).image,
    async views(clipId, index) {
      const entry = decoded(clipId, index);
      entry.views ??= viewCodes(await entry.image);
      return entry.views;
    },
    async field(clipId, index) {
      const file = layout(clipId).motionField(index);
      return readStoredField(await fs.promises.readFile(file), file);
    },
  };
}
