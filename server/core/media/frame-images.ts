import sharp from 'sharp';

/**
 * Reading and encoding the still images of the pipeline with sharp: sampled frames (lossless WebP, or 8-bit RGB
 * PNG in the original format), the luma view (8-bit grey PNG), the chroma view (16-bit RGB PNG), motion pictures
 * (8-bit RGB PNG) and the thumbnail. Pixels in, bytes or files out; no job logic.
 */

const THUMBNAIL_LONGEST_SIDE = 160;
const THUMBNAIL_QUALITY = 80;

export interface RgbImage {
  /** Interleaved 8-bit R, G, B, row by row. */
  rgb: Uint8Array;
  width: number;
  height: number;
}

export async function readRgbImage(file: string | Buffer): Promise<RgbImage> {
  const { data, info } = await sharp(file)
    .removeAlpha()
    .toColourspace('srgb')
    .raw()
    .toBuffer({ resolveWithObject: true });
  return { rgb: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

/** One 8-bit channel; `b-w` keeps it one channel in the PNG instead of three equal ones. */
export function greyPng(grey: Uint8Array, width: number, height: number): Promise<Buffer> {
  return sharp(grey, { raw: { width, height, channels: 1 } })
    .toColourspace('b-w')
    .png()
    .toBuffer();
}

/** Three 8-bit channels, interleaved R, G, B (frames in shards, motion pictures). */
export function rgbPng(rgb: Uint8Array, width: number, height: number): Promise<Buffer> {
  return sharp(rgb, { raw: { width, height, channels: 3 } })
    .png()
    .toBuffer();
}

/** Three 16-bit channels; a Uint16Array input tells sharp the depth, `rgb16` keeps it in the PNG. */
export function rgb16Png(rgb: Uint16Array, width: number, height: number): Promise<Buffer> {
  return sharp(rgb, { raw: { width, height, channels: 3 } })
    .toColourspace('rgb16')
    .png()
    .toBuffer();
}

/** A frame as lossless WebP (the compact-storage job's conversion of PNG frames). */
export async function writeLosslessWebp(rgb: Uint8Array, width: number, height: number, file: string) {
  await sharp(rgb, { raw: { width, height, channels: 3 } })
    .webp({ lossless: true, effort: 0 })
    .toFile(file);
}

/** A small JPEG of a frame for lists. */
export async function writeThumbnail(frameFile: string, file: string): Promise<void> {
  await sharp(frameFile)
    .resize(THUMBNAIL_LONGEST_SIDE, THUMBNAIL_LONGEST_SIDE, { fit: 'inside' })
    .jpeg({ quality: THUMBNAIL_QUALITY })
    .toFile(file);
}

/** Small copies for the frame strip: lossy WebP is a fraction of the bytes and fine at 34–108 pixels high. */
const SHRUNK_QUALITY = 82;

/** A picture `height` pixels high, its aspect ratio kept (never enlarged), as WebP. */
export function shrunkWebp(picture: Buffer, height: number): Promise<Buffer> {
  return sharp(picture).resize({ height, withoutEnlargement: true }).webp({ quality: SHRUNK_QUALITY }).toBuffer();
}
