import { rgbImageToLab } from '../../../shared/colour/srgb-lab';
import { encodeChroma, encodeLuma } from '../../../shared/colour/view-encoding';
import type { FrameView } from '../../../shared/pipeline-stages';
import { greyPng, readRgbImage, rgb16Png, type RgbImage } from './frame-images';

/**
 * The luma (L*) and chroma (a*, b*) views of a frame, derived from the stored frame whenever a request or a
 * pairset build needs them instead of being kept on disk: sRGB → CIE L*a*b* (shared/colour/srgb-lab.ts), encoded
 * as DESIGN §7 says (shared/colour/view-encoding.ts). The frame is lossless, so a view derived now has the same
 * codes as one derived at processing time.
 */

export interface ViewCodes {
  width: number;
  height: number;
  /** round(L* × 2.55), one byte a pixel. */
  luma: Uint8Array;
  /** a* in red, b* in green, blue 0, 16 bits each. */
  chroma: Uint16Array;
}

export function viewCodes({ rgb, width, height }: RgbImage): ViewCodes {
  const pixels = width * height;
  const lab = { l: new Float32Array(pixels), a: new Float32Array(pixels), b: new Float32Array(pixels) };
  rgbImageToLab(rgb, lab);
  return { width, height, luma: encodeLuma(lab.l), chroma: encodeChroma(lab.a, lab.b) };
}

/** One view of a frame (its stored bytes or a file) as the PNG a shard or the clip page gets. */
export async function viewPng(frameFile: string | Buffer, view: FrameView): Promise<Buffer> {
  return viewCodesPng(viewCodes(await readRgbImage(frameFile)), view);
}

export function viewCodesPng(codes: ViewCodes, view: FrameView): Promise<Buffer> {
  return view === 'luma'
    ? greyPng(codes.luma, codes.width, codes.height)
    : rgb16Png(codes.chroma, codes.width, codes.height);
}
