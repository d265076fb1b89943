import sharp from 'sharp';

/**
 * Reading and writing the still images of the pipeline with sharp: sampled frames (8-bit RGB PNG), the luma view
 * (8-bit grey PNG), the chroma view (16-bit RGB PNG), motion pictures (8-bit RGB PNG) and the thumbnail. Pixels in,
 * files out; no job logic.
 */

const THUMBNAIL_LONGEST_SIDE = 160;
const THUMBNAIL_QUALITY = 80;

export interface RgbImage {
  /** Interleaved 8-bit R, G, B, row by row. */
  rgb: Uint8Array;
  width: number;
  height: number;
}

export async function readRgbImage(file: string): Promise<RgbImage> {
  const { data, info } = await sharp(file)
    .removeAlpha()
    .toColourspace('srgb')
    .raw()
    .toBuffer({ resolveWithObject: true });
  return { rgb: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

/** One 8-bit channel; `b-w` keeps it one channel in the PNG instead of three equal ones. */
export async function writeGreyPng(grey: Uint8Array, width: number, height: number, file: string): Promise<void> {
  await sharp(grey, { raw: { width, height, channels: 1 } })
    .toColourspace('b-w')
    .png()
    .toFile(file);
}

/** Three 8-bit channels, interleaved R, G, B (motion pictures). */
export async function writeRgbPng(rgb: Uint8Array, width: number, height: number, file: string): Promise<void> {
  await sharp(rgb, { raw: { width, height, channels: 3 } })
    .png()
    .toFile(file);
}

/** Three 16-bit channels; a Uint16Array input tells sharp the depth, `rgb16` keeps it in the PNG. */
export async function writeRgb16Png(rgb: Uint16Array, width: number, height: number, file: string): Promise<void> {
  await sharp(rgb, { raw: { width, height, channels: 3 } })
    .toColourspace('rgb16')
    .png()
    .toFile(file);
}

/** A small JPEG of a frame for lists. */
export async function writeThumbnail(frameFile: string, file: string): Promise<void> {
  await sharp(frameFile)
    .resize(THUMBNAIL_LONGEST_SIDE, THUMBNAIL_LONGEST_SIDE, { fit: 'inside' })
    .jpeg({ quality: THUMBNAIL_QUALITY })
    .toFile(file);
}
