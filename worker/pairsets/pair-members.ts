import fs from 'node:fs';
import sharp from 'sharp';
import { viewReach, type ViewName } from '../../shared/pairing/pairing-graph';
import type { MotionFormat } from '../../shared/schemas/pairsets';
import type { StoragePaths } from '../../server/core/storage/paths';
import { decodeFlo, encodeFlo } from '../motion/formats/flo';
import { encodeKittiFlow } from '../motion/formats/kitti-png';
import { areaResizeFlow } from './resize-flow';

/**
 * The file a view of a moment becomes in a shard (DESIGN §7). Without conversion it is the clip's own file,
 * copied byte for byte: frames and neighbours as 8-bit RGB PNG, luma as 8-bit grey PNG, chroma as 16-bit RGB PNG,
 * motion as Middlebury .flo. With an output size, images are resized with sharp (its default Lanczos-3 kernel,
 * stretched to exactly the computed size, keeping each view's channels and depth) and motion fields with
 * areaResizeFlow; motion in the KITTI 2015 format is written as a 16-bit RGB PNG (R = u, G = v, B = valid).
 */

export interface MemberOptions {
  paths: StoragePaths;
  motionFormat: MotionFormat;
  /** Longest side of the stored views, or undefined to keep the working size. */
  outputSize?: number;
}

/** A member ready for the tar: the clip's own file, or a converted copy in the build's staging folder. */
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

/** The clip's stored file of a view. */
export function viewSourceFile(paths: StoragePaths, clipId: number, moment: number, view: ViewName): string {
  const layout = paths.clipDerived(clipId);
  if (view === 'motion') return layout.motionFlo(moment);
  if (view === 'luma' || view === 'chroma') return layout.view(view, moment);
  return layout.frame(viewFrame(view, moment));
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
 * Makes the member for one view: the source file itself when no conversion is needed, else a converted file at
 * `stagingFile`. A missing source says which clip, frame and file, in words a person can act on.
 */
export async function viewMember(
  view: ViewName,
  clipId: number,
  moment: number,
  options: MemberOptions,
  stagingFile: string,
): Promise<MemberFile> {
  const source = viewSourceFile(options.paths, clipId, moment, view);
  const stat = await fs.promises.stat(source).catch(() => null);
  if (!stat) {
    throw new Error(
      `The ${view} view of clip ${clipId} at frame ${viewFrame(view, moment)} is missing (${source}); ` +
        'the clip may have been reprocessed or purged since the build started. Build again once it is processed.',
    );
  }
  const data = view === 'motion' ? await motionMember(source, options) : await imageMember(view, source, options);
  if (!data) return { file: source, size: stat.size };
  await fs.promises.writeFile(stagingFile, data);
  return { file: stagingFile, size: data.byteLength };
}

async function imageMember(view: ViewName, source: string, options: MemberOptions): Promise<Buffer | null> {
  if (options.outputSize === undefined) return null;
  const { width, height } = await sharp(source).metadata();
  const out = outputDims({ width, height }, options.outputSize);
  if (!out) return null;
  const resized = sharp(source).resize(out.width, out.height, { fit: 'fill' });
  if (view === 'luma') return resized.toColourspace('b-w').png().toBuffer();
  if (view === 'chroma') return resized.toColourspace('rgb16').png().toBuffer();
  return resized.png().toBuffer();
}

async function motionMember(source: string, options: MemberOptions): Promise<Uint8Array | null> {
  const dims = options.outputSize === undefined ? null : await floSize(source);
  const out = dims && outputDims(dims, options.outputSize);
  if (!out && options.motionFormat === 'flo') return null;
  const field = decodeFlo(await fs.promises.readFile(source));
  const flow = out ? areaResizeFlow(field.flow, field.width, field.height, out.width, out.height) : field.flow;
  const size = out ?? field;
  if (options.motionFormat === 'flo') return encodeFlo(flow, size.width, size.height);
  return sharp(encodeKittiFlow(flow), { raw: { width: size.width, height: size.height, channels: 3 } })
    .toColourspace('rgb16')
    .png()
    .toBuffer();
}

/** Width and height from a .flo header (bytes 4–11), without reading the field. */
async function floSize(file: string): Promise<Size> {
  const handle = await fs.promises.open(file, 'r');
  try {
    const header = Buffer.alloc(12);
    await handle.read(header, 0, 12, 0);
    return { width: header.readInt32LE(4), height: header.readInt32LE(8) };
  } finally {
    await handle.close();
  }
}
