import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';

const run = promisify(execFile);

/** Runs the bundled ffmpeg to make a test file; footage comes from lavfi test sources, never from real cameras. */
export async function ffmpegMake(output: string, args: string[]): Promise<string> {
  fs.mkdirSync(path.dirname(output), { recursive: true });
  await run(ffmpegInstaller.path, ['-v', 'error', '-y', ...args, output]);
  return output;
}

/** A short H.264 clip of the moving lavfi test pattern; `seed` varies the picture so files differ. */
export function makeTestClip(
  dir: string,
  name: string,
  {
    seconds = 2,
    size = '160x120',
    rate = 25,
    seed = 0,
  }: { seconds?: number; size?: string; rate?: number; seed?: number } = {},
): Promise<string> {
  return ffmpegMake(path.join(dir, name), [
    '-f',
    'lavfi',
    '-i',
    `testsrc2=size=${size}:rate=${rate}:duration=${seconds}`,
    '-vf',
    `hue=h=${seed * 37}`,
    '-c:v',
    'libx264',
    '-preset',
    'ultrafast',
    '-pix_fmt',
    'yuv420p',
    '-movflags',
    '+faststart',
  ]);
}

export function makeAudioOnly(dir: string, name = 'voice-note.m4a'): Promise<string> {
  return ffmpegMake(path.join(dir, name), ['-f', 'lavfi', '-i', 'sine=frequency=440:duration=1', '-c:a', 'aac']);
}

export function makeStillImage(dir: string, name = 'still.png'): Promise<string> {
  return ffmpegMake(path.join(dir, name), ['-f', 'lavfi', '-i', 'testsrc2=size=64x48', '-frames:v', '1']);
}

/** A 1×1 px video (lavfi's colour source refuses that size, so the test pattern is scaled down to it). */
export function makeOnePixelClip(dir: string, name = 'one-pixel.mkv'): Promise<string> {
  return ffmpegMake(path.join(dir, name), [
    '-f',
    'lavfi',
    '-i',
    'testsrc2=size=32x32:rate=10:duration=1',
    '-vf',
    'scale=1:1',
    '-c:v',
    'ffv1',
  ]);
}

/** The first half of a real MP4 whose index sits at the end, as a copy cut off in transfer would be. */
export async function makeTruncatedClip(dir: string, name = 'cut-short.mp4'): Promise<string> {
  const whole = await ffmpegMake(path.join(dir, `whole-${name}`), [
    '-f',
    'lavfi',
    '-i',
    'testsrc2=size=160x120:rate=25:duration=2',
    '-c:v',
    'libx264',
    '-preset',
    'ultrafast',
  ]);
  const bytes = fs.readFileSync(whole);
  const target = path.join(dir, name);
  fs.writeFileSync(target, bytes.subarray(0, Math.floor(bytes.length / 2)));
  return target;
}
