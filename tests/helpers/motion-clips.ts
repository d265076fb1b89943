// Clips whose camera motion is known, for the Motion stage tests: a still texture (the value noise of
// motion-pairs.ts) seen through a crop window that ffmpeg moves frame by frame. Content moves opposite to the
// window, so a window moving by +d source px per frame gives u = −d·k·s px per sampled step, with k source frames
// per sampled frame and s = working size / crop width.
import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import sharp from 'sharp';
import { texture } from './motion-pairs';

const run = promisify(execFile);

export const SOURCE_FPS = 25;
/** Crop window (the clip's picture size). */
export const CROP = { width: 640, height: 360 };
/** The texture is drawn at this zoom, so its finest octave survives the scale-down to the working size. */
const TEXTURE_ZOOM = 1.5;

/** A grey-ish texture PNG, tinted slightly per channel so it is not a grey picture. */
export async function makeTexture(file: string, width: number, height: number, seed: number): Promise<string> {
  const rgb = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const grey = texture(x / TEXTURE_ZOOM, y / TEXTURE_ZOOM, seed);
      const o = 3 * (y * width + x);
      rgb[o] = Math.round(grey);
      rgb[o + 1] = Math.round(grey * 0.9 + 12);
      rgb[o + 2] = Math.round(grey * 0.8 + 20);
    }
  }
  await sharp(rgb, { raw: { width, height, channels: 3 } })
    .png()
    .toFile(file);
  return file;
}

/** Crop of the texture with window position expressions in ffmpeg's syntax (`n` is the frame number). */
export function cropFilter(x: string, y: string): string {
  return `crop=${CROP.width}:${CROP.height}:x='${x}':y='${y}'`;
}

/** An H.264 clip of `seconds` of the still texture through the crop filter. */
export async function makeWindowClip(file: string, textureFile: string, seconds: number, crop: string) {
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-loop',
    '1',
    '-framerate',
    String(SOURCE_FPS),
    '-t',
    String(seconds),
    '-i',
    textureFile,
    '-vf',
    `${crop},format=yuv420p`,
    '-c:v',
    'libx264',
    '-crf',
    '18',
    '-preset',
    'veryfast',
    '-movflags',
    '+faststart',
    file,
  ]);
  return file;
}

/**
 * A pan over the texture, then a hard cut to ffmpeg's colour test pattern, then the pan again: two cuts with
 * fields on both sides of each.
 */
export async function makeCutClip(file: string, textureFile: string, secondsEach: number, crop: string) {
  const still = ['-loop', '1', '-framerate', String(SOURCE_FPS), '-t', String(secondsEach), '-i', textureFile];
  const size = `${CROP.width}x${CROP.height}`;
  const pattern = `testsrc2=size=${size}:rate=${SOURCE_FPS}:duration=${secondsEach}`;
  const graph =
    `[0:v]${crop},setsar=1,format=yuv420p[a];[1:v]setsar=1,format=yuv420p[b];` +
    `[2:v]${crop},setsar=1,format=yuv420p[c];[a][b][c]concat=n=3:v=1[v]`;
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    ...still,
    '-f',
    'lavfi',
    '-i',
    pattern,
    ...still,
    '-filter_complex',
    graph,
    '-map',
    '[v]',
    '-c:v',
    'libx264',
    '-crf',
    '18',
    '-preset',
    'veryfast',
    '-movflags',
    '+faststart',
    file,
  ]);
  return file;
}

export const textureFileIn = (dir: string, seed: number) => path.join(dir, `texture-${seed}.png`);
