import fs from 'node:fs';
import sharp, { type Sharp } from 'sharp';
import { viewReach, type ViewName } from '../../shared/pairing/pairing-graph';
import type { MotionFormat } from '../../shared/schemas/pairsets';
import { encodeFlo } from '../../shared/motion/formats/flo';
import { encodeKittiFlow } from '../../shared/motion/formats/kitti-png';
import { areaResizeFlow } from './resize-flow';
import type { ViewReader } from './view-reader';

/**
 * The file a view of a moment becomes in a shard (DESIGN §7): frames and neighbours as 8-bit RGB PNG, luma as
 * 8-bit grey PNG, chroma as 16-bit RGB PNG, motion as Middlebury .flo or KITTI 2015 PNG. Every member is made
 * from the decoded frame or field with fixed encoder settings, never copied from the clip's files, so a shard's
 * bytes depend on the pixels alone and not on how the clip happens to be stored (lossless WebP frames, packed
 * fields). With an output size, images are resized with sharp (its default Lanczos-3 kernel, stretched to exactly
 * the computed size, keeping each view's channels and depth) and motion fields with areaResizeFlow; motion in the
 * KITTI 2015 format is a 16-bit RGB PNG (R = u, G = v, B = valid).
 */

export interface MemberOptions {
  reader: ViewReader;
  motionFormat: MotionFormat;
  /** Longest side of the stored views, or undefined to keep the working size. */
  outputSize?: number;
}

/** A member ready for the tar: a file in the build's staging folder. */
export interface MemberFile {
  file: string;
  size: number;
}

export interface Size {
  width: number;
  height: number;
}

export function viewExtension(view: ViewName, motionFormat: MotionFormat): 'png' | 'flo' {
  return view === 'motion' && motionFormat === 'flo' ? 'flo' : 'png';
}

/** Frame the view reads: t for frame, luma, chroma and motion (its field starts at t), t + Δ for a neighbour. */
export function viewFrame(view: ViewName, moment: number): number {
  return view === 'motion' ? moment : moment + viewReach(view);
}

/** Longest side `outputSize`, the other side in proportion (at least 1 px); null when nothing changes. */
export function outputDims(size: Size, outputSize: number | undefined): Size | null {
  if (outputSize === undefined) return null;
  const scale = outputSize / Math.max(size.width, size.height);
  const out = {
    width: Math.max(1, Math.round(size.width * scale)),
    height: Math.max(1, Math.round(size.height * scale)),
  };
  return out.width === size.width && out.height === size.height ? null : out;
}

/**
 * Makes the member for one view at `stagingFile`. A missing frame or field says which clip, frame and file, in
 * words a person can act on.
 */
export async function viewMember(
  view: ViewName,
  clipId: number,
  moment: number,
  options: MemberOptions,
  stagingFile: string,
): Promise<MemberFile> {
  const frame = viewFrame(view, moment);
  const stored = await options.reader.stored(
    clipId,
    view === 'motion' ? 'field' : 'frame',
    view === 'motion' ? moment : frame,
  );
  if (!stored) {
    throw new Error(
      `The ${view} view of clip ${clipId} at frame ${frame} is missing from the store; ` +
        'the clip may have been reprocessed or purged since the build started. Build again once it is processed.',
    );
  }
  const data =
    view === 'motion' ? await motionMember(clipId, moment, options) : await imageMember(view, clipId, frame, options);
  await fs.promises.writeFile(stagingFile, data);
  return { file: stagingFile, size: data.byteLength };
}

async function imageMember(view: ViewName, clipId: number, frame: number, options: MemberOptions): Promise<Buffer> {
  const { reader, outputSize } = options;
  if (view === 'luma' || view === 'chroma') {
    const codes = await reader.views(clipId, frame);
    const luma = view === 'luma';
    const raw = { width: codes.width, height: codes.height, channels: luma ? 1 : 3 } as const;
    return resized(sharp(luma ? codes.luma : codes.chroma, { raw }), outputDims(codes, outputSize))
      .toColourspace(luma ? 'b-w' : 'rgb16')
      .png()
      .toBuffer();
  }
  const image = await reader.frame(clipId, frame);
  const raw = { width: image.width, height: image.height, channels: 3 } as const;
  return resized(sharp(image.rgb, { raw }), outputDims(image, outputSize)).png().toBuffer();
}

function resized(image: Sharp, out: Size | null): Sharp {
  return out ? image.resize(out.width, out.height, { fit: 'fill' }) : image;
}

async function motionMember(clipId: number, moment: number, options: MemberOptions): Promise<Uint8Array> {
  const field = await options.reader.field(clipId, moment);
  const out = outputDims(field, options.outputSize);
  const flow = out ? areaResizeFlow(field.flow, field.width, field.height, out.width, out.height) : field.flow;
  const size = out ?? field;
  if (options.motionFormat === 'flo') return encodeFlo(flow, size.width, size.height);
  return sharp(encodeKittiFlow(flow), { raw: { width: size.width, height: size.height, channels: 3 } })
    .toColourspace('rgb16')
    .png()
    .toBuffer();
}
