import { readRgbImage, type RgbImage } from '../../server/core/media/frame-images';
import { viewCodes, type ViewCodes } from '../../server/core/media/frame-views';
import { readStoredField } from '../../server/core/media/stored-field';
import type { PackedFieldContent } from '../../server/core/media/packed-field';
import type { ObjectStore } from '../../server/core/storage/object-store';
import { objectKeys, type DerivedFormat } from '../../server/core/storage/paths';

/** Decoded frames kept at once: a pair reads at most two frames, and the next pair usually one of them again. */
const RECENT_FRAMES = 4;

/**
 * A pairset build's way to the stored frames and fields of its clips, in the storage folder or a bucket, whichever
 * format each clip is stored in. Luma and chroma are derived from the frame (media/frame-views.ts); the last few
 * frames read are kept decoded, so the views and the frame of one moment cost one read and one decode.
 */
export interface ViewReader {
  /** The stored key of a frame or of the forward field leaving it, when the store holds it; null when not. */
  stored(clipId: number, kind: 'frame' | 'field', index: number): Promise<string | null>;
  frame(clipId: number, index: number): Promise<RgbImage>;
  views(clipId: number, index: number): Promise<ViewCodes>;
  field(clipId: number, index: number): Promise<PackedFieldContent>;
}

export function createViewReader(
  store: ObjectStore,
  clips: ReadonlyMap<number, { derivedFormat: DerivedFormat }>,
): ViewReader {
  const layout = (clipId: number) => objectKeys.clipDerived(clipId, clips.get(clipId)?.derivedFormat ?? 'packed');
  const keyOf = (clipId: number, kind: 'frame' | 'field', index: number) =>
    kind === 'frame' ? layout(clipId).frame(index) : layout(clipId).motionField(index);
  const bytesOf = async (key: string) => {
    const bytes = await store.getBytes(key);
    if (!bytes) throw new Error(`${key} is not in the store`);
    return bytes;
  };
  const recent = new Map<string, { image: Promise<RgbImage>; views?: ViewCodes }>();
  const decoded = (clipId: number, index: number) => {
    const key = `${clipId}:${index}`;
    let entry = recent.get(key);
    if (entry) {
      recent.delete(key);
    } else {
      entry = { image: bytesOf(keyOf(clipId, 'frame', index)).then(readRgbImage) };
      entry.image.catch(() => recent.delete(key));
    }
    recent.set(key, entry);
    if (recent.size > RECENT_FRAMES) recent.delete(recent.keys().next().value!);
    return entry;
  };
  return {
    async stored(clipId, kind, index) {
      const key = keyOf(clipId, kind, index);
      return (await store.head(key)) ? key : null;
    },
    frame: (clipId, index) => decoded(clipId, index).image,
    async views(clipId, index) {
      const entry = decoded(clipId, index);
      entry.views ??= viewCodes(await entry.image);
      return entry.views;
    },
    async field(clipId, index) {
      const key = keyOf(clipId, 'field', index);
      return readStoredField(await bytesOf(key), key);
    },
  };
}
