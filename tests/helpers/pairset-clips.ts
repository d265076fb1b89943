import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { greyPng, rgb16Png } from '../../server/core/media/frame-images';
import { viewCodes } from '../../server/core/media/frame-views';
import { encodePackedField } from '../../server/core/media/packed-field';
import { Clip, Frame, MotionField } from '../../server/core/models';
import { originalOnlyFiles } from '../../server/core/storage/original-format';
import { storagePaths, type DerivedFormat } from '../../server/core/storage/paths';
import type { ClipState } from '../../shared/clip-states';
import { encodeFlo } from '../../shared/motion/formats/flo';
import sharp from 'sharp';
import type { TestServer } from './test-server';

export interface PairsetClipOptions {
  projectId: number;
  uploaderId: number;
  frames: number;
  /** Frames before which a cut lies. */
  cutsBefore?: number[];
  width?: number;
  height?: number;
  /** Horizontal shift of the picture per frame in px; 0 gives a clip whose frames are all the same. */
  shift?: number;
  /** Varies the picture between clips. */
  seed?: number;
  site?: string;
  tags?: string[];
  capturedAt?: Date | null;
  state?: ClipState;
  /** Writes forward motion fields (.flo and rows) for every neighbour pair that no cut separates. */
  motion?: boolean;
  sampleFps?: number;
  /** How the files are stored (storage/paths.ts); `original` also writes the views the original format kept. */
  format?: DerivedFormat;
}

/**
 * A clip as processing and review leave it, made directly (no ffmpeg, no pipeline): the clip row, frame rows
 * with signals and cuts, frames of a smooth pattern moving `shift` px to the right per frame, and, with `motion`,
 * forward fields of exactly (shift, 0) with their motion_fields rows, stored in the `packed` format (lossless WebP,
 * packed fields) or the `original` one (PNG, Middlebury .flo, stored luma and chroma views). Tests set the state
 * (accepted by default).
 */
export async function addPairsetClip(server: TestServer, options: PairsetClipOptions): Promise<Clip> {
  const {
    frames,
    width = 64,
    height = 48,
    shift = 1,
    seed = 0,
    cutsBefore = [],
    sampleFps = 5,
    motion = true,
    format = 'packed',
  } = options;
  const name = `pattern-${seed}-${Date.now()}-${Math.random().toString(36).slice(2, 8)}.mp4`;
  const clip = await Clip.create({
    projectId: options.projectId,
    uploaderId: options.uploaderId,
    originalName: name,
    sizeBytes: 1000,
    storedBytes: 1000,
    sha256: createHash('sha256').update(name).digest('hex'),
    sourceExt: 'mp4',
    state: options.state ?? 'accepted',
    container: 'mov,mp4',
    codec: 'h264',
    durationS: frames / sampleFps,
    fps: 25,
    width,
    height,
    rotation: 0,
    site: options.site ?? '',
    rig: '',
    capturedAt: options.capturedAt ?? null,
    tags: options.tags ?? [],
    notes: '',
    frameCount: frames,
    cutCount: cutsBefore.length,
    derivedFormat: format,
  });
  const paths = storagePaths(server.storageDir);
  const layout = paths.clipDerived(clip.id, format);
  const viewsDir = originalOnlyFiles(paths.clipDir(clip.id)).viewsDir;
  for (const dir of [layout.framesDir, layout.motionDir]) fs.mkdirSync(dir, { recursive: true });
  for (let index = 0; index < frames; index += 1) {
    const rgb = patternFrame(width, height, index * shift, seed);
    const image = sharp(rgb, { raw: { width, height, channels: 3 } });
    await (format === 'packed' ? image.webp({ lossless: true }) : image.png()).toFile(layout.frame(index));
    if (format === 'original') await writeStoredViews(viewsDir, index, { rgb, width, height });
    await Frame.create({
      clipId: clip.id,
      index,
      timeS: index / sampleFps,
      meanLuma: 120 + seed,
      contrast: 0.2,
      sharpness: 100 + 10 * index + seed,
      clippedShare: 0,
      cutBefore: cutsBefore.includes(index),
    });
    const joined = index + 1 < frames && !cutsBefore.includes(index + 1);
    if (motion && joined) {
      const flow = uniformField(width, height, shift);
      fs.writeFileSync(
        layout.motionField(index),
        format === 'packed'
          ? encodePackedField({ width, height, flow, consistent: new Uint8Array(width * height).fill(1) })
          : encodeFlo(flow, width, height),
      );
      if (format === 'original') {
        const backward = uniformField(width, height, -shift);
        fs.writeFileSync(
          originalOnlyFiles(paths.clipDir(clip.id)).backwardField(index),
          encodeFlo(backward, width, height),
        );
      }
      await MotionField.create({
        clipId: clip.id,
        fromIndex: index,
        toIndex: index + 1,
        direction: 'forward',
        estimator: 'farneback',
        params: {},
        meanMagnitude: Math.abs(shift) + index / 100,
        p95Magnitude: Math.abs(shift),
        consistentShare: 0.9,
        medianU: shift,
        medianV: 0,
        maxMagnitude: Math.abs(shift),
      });
    }
  }
  return clip;
}

/** The luma and chroma PNGs the original format kept in views/luma and views/chroma. */
async function writeStoredViews(
  viewsDir: string,
  index: number,
  image: { rgb: Uint8Array; width: number; height: number },
) {
  const codes = viewCodes(image);
  const name = `${String(index).padStart(6, '0')}.png`;
  for (const view of ['luma', 'chroma'] as const) fs.mkdirSync(path.join(viewsDir, view), { recursive: true });
  fs.writeFileSync(path.join(viewsDir, 'luma', name), await greyPng(codes.luma, codes.width, codes.height));
  fs.writeFileSync(path.join(viewsDir, 'chroma', name), await rgb16Png(codes.chroma, codes.width, codes.height));
}

/** A smooth colour pattern moved right by `offset` px: channels with different periods and phases. */
export function patternFrame(width: number, height: number, offset: number, seed: number): Uint8Array {
  const rgb = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const u = x - offset;
      const i = 3 * (y * width + x);
      rgb[i] = Math.round(128 + 100 * Math.sin(u * 0.31 + seed) * Math.cos(y * 0.17));
      rgb[i + 1] = Math.round(128 + 90 * Math.cos(u * 0.13 - y * 0.21 + 2 * seed));
      rgb[i + 2] = Math.round(128 + 80 * Math.sin((u + y) * 0.09 + 3 * seed));
    }
  }
  return rgb;
}

function uniformField(width: number, height: number, u: number): Float32Array {
  const flow = new Float32Array(2 * width * height);
  for (let p = 0; p < width * height; p += 1) flow[2 * p] = u;
  return flow;
}
