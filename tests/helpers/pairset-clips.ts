import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { Clip, Frame, MotionField } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import type { ClipState } from '../../shared/clip-states';
import { encodeFlo } from '../../worker/motion/formats/flo';
import { writeFrameViews } from '../../worker/pool/frame-tasks';
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
}

/**
 * A clip as processing and review leave it, made directly (no ffmpeg, no pipeline): the clip row, frame rows
 * with signals and cuts, frame PNGs of a smooth pattern moving `shift` px to the right per frame, luma and chroma
 * views written by the pipeline's own views task, and, with `motion`, forward fields of exactly (shift, 0) as
 * Middlebury .flo with their motion_fields rows. Tests set the state (accepted by default).
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
  });
  const layout = storagePaths(server.storageDir).clipDerived(clip.id);
  for (const dir of [layout.framesDir, layout.viewDir('luma'), layout.viewDir('chroma'), layout.motionDir]) {
    fs.mkdirSync(dir, { recursive: true });
  }
  for (let index = 0; index < frames; index += 1) {
    await sharp(patternFrame(width, height, index * shift, seed), { raw: { width, height, channels: 3 } })
      .png()
      .toFile(layout.frame(index));
    await writeFrameViews({
      kind: 'views',
      frameFile: layout.frame(index),
      lumaFile: layout.view('luma', index),
      chromaFile: layout.view('chroma', index),
    });
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
      fs.writeFileSync(layout.motionFlo(index), encodeFlo(uniformField(width, height, shift), width, height));
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
