import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import { renderTexture } from '../server/demo/footage';

export const ROW_PASS_WIDTH = 1280;
export const ROW_PASS_HEIGHT = 720;

/**
 * The benchmarks' long clip: 1280×720 at 25 frames/s, the foliage texture of the demo seen through a window that
 * sweeps it back and forth (up to ~55 px/s) while a crate crosses every few seconds. Rendered into `dir`.
 */
export async function renderRowPassClip(dir: string, seconds: number): Promise<string> {
  const texture = await renderTexture(dir, 7, '2400x1350');
  const file = path.join(dir, 'long-row-pass-720p.mp4');
  const camera = `crop=${ROW_PASS_WIDTH}:${ROW_PASS_HEIGHT}:x='560+500*sin(t/9)':y='315+300*sin(t/13)'`;
  const crate = "drawbox=x='mod(t*160,1500)-120':y=420:w=140:h=92:color=0xc2410c@0.95:t=fill";
  await promisify(execFile)(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-loop',
    '1',
    '-framerate',
    '25',
    '-i',
    texture,
    '-vf',
    `${camera},${crate},format=yuv420p`,
    '-t',
    String(seconds),
    '-c:v',
    'libx264',
    '-preset',
    'veryfast',
    '-crf',
    '22',
    '-movflags',
    '+faststart',
    file,
  ]);
  return file;
}
