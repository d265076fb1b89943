import { createHash } from 'node:crypto';
import { shrunkWebp } from '../media/frame-images';
import type { Clip } from '../models';
import { DEFAULT_PICTURE_CACHE_BYTES, PictureCache, type PictureCacheStats } from './picture-cache';

/**
 * A picture made when asked (a view, a motion picture), known by what it is made of before it is made: its ETag
 * comes from the clip, the picture's address and the clip's processing stamp (and the motion scale), so a browser
 * that has it gets a 304 without a field read or a PNG encoded, and a kept copy (picture-cache.ts) answers the
 * rest.
 */
export interface MadePicture {
  etag: string;
  bytes(): Promise<Buffer>;
}

/** Clips whose motion scale is remembered: a number each, so the bound only stops endless growth. */
const MAX_REMEMBERED_SCALES = 1024;

let pictures = new PictureCache(DEFAULT_PICTURE_CACHE_BYTES);
let scales = new Map<string, Promise<number>>();

/**
 * What changes whenever a clip's frames or fields are made again. Every stage of processing commits its rows in
 * the transaction that writes the clip's storedBytes (worker/jobs/process-clip.ts), marking or clearing a cut
 * recounts the clip's cuts (clip-cuts.ts), and converting the stored format changes derivedFormat: each of these
 * writes the clip row, so its updatedAt (to the millisecond) with the format tells one processing from another.
 * Other writes of the clip (a verdict, new notes) change it too and only cost pictures made again.
 */
export function processingStamp(clip: Pick<Clip, 'updatedAt' | 'derivedFormat'>): string {
  return `${clip.updatedAt.getTime()}.${clip.derivedFormat}`;
}

/** `parts` must name everything the bytes depend on; `keep: false` for files too large to be worth keeping. */
export function madePicture(
  parts: readonly (string | number)[],
  make: () => Promise<Buffer>,
  { keep = true }: { keep?: boolean } = {},
): MadePicture {
  const key = parts.join('/');
  return {
    etag: `"${createHash('sha256').update(key).digest('base64url').slice(0, 27)}"`,
    bytes: () => (keep ? pictures.get(key, make) : make()),
  };
}

/** `picture` shrunk to `height` pixels high (WebP), known by the picture's own ETag and the height. */
export function shrunkPicture(picture: MadePicture, height: number): MadePicture {
  return madePicture(['shrunk', picture.etag, height], async () => shrunkWebp(await picture.bytes(), height));
}

/** The clip's motion scale worked out once per processing stamp (`stamp`) and then remembered. */
export function rememberedScale(clipId: number, stamp: string, workOut: () => Promise<number>): Promise<number> {
  if (pictures.stats().maxBytes === 0) return workOut();
  const key = `${clipId}/${stamp}`;
  const known = scales.get(key);
  if (known) return known;
  const scale = workOut();
  // A failed reading is not remembered: the next request tries again.
  scale.catch(() => scales.delete(key));
  scales.set(key, scale);
  if (scales.size > MAX_REMEMBERED_SCALES) scales.delete(scales.keys().next().value!);
  return scale;
}

/**
 * Sets the bound on the bytes of kept pictures and forgets what was kept. 0 keeps nothing (nor motion scales):
 * every answer makes its picture, as before pictures were kept (bench/clip-pictures.ts compares the two).
 */
export function setPictureCacheBytes(maxBytes: number): void {
  pictures = new PictureCache(maxBytes);
  scales = new Map();
}

export function pictureCacheStats(): PictureCacheStats {
  return pictures.stats();
}
