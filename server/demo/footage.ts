import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import { DEMO_DUPLICATE, DEMO_NOT_A_VIDEO, type DemoClipRecipe } from './scenario';

const run = promisify(execFile);
const TEXTURE_SIZE = '1600x900';
const FRAME = { width: 640, height: 360, rate: 25 };

/**
 * A large foliage-like texture: layered sines in green and brown with fixed grain, different per seed. The camera
 * of a demo clip is a 640×360 window moving over it, so the true motion of every clip is known by construction.
 */
export async function renderTexture(dir: string, seed: number, size = TEXTURE_SIZE): Promise<string> {
  const file = path.join(dir, `texture-${seed}-${size}.png`);
  if (fs.existsSync(file)) return file;
  const a = 17 + (seed % 7) * 4;
  const b = 29 + (seed % 5) * 6;
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-f',
    'lavfi',
    '-i',
    `nullsrc=s=${size},format=rgb24,geq=` +
      `r='50+25*sin(X/${b}+2*sin(Y/37))+20*sin((X+Y)/5+${seed})':` +
      `g='105+40*sin(X/${a}+3*sin(Y/41)+${seed})+30*sin(Y/4+2*cos(X/53))':` +
      `b='45+18*sin(Y/19+X/31+${seed})',noise=alls=45:allf=0:all_seed=${seed}`,
    '-frames:v',
    '1',
    file,
  ]);
  return file;
}

/** Opacity of a mover's box, so the foliage shows faintly through it. */
export const MOVER_OPACITY = 0.95;

/**
 * The camera's view of input `[input]` as filter-graph text ending in `[output]`: the crop along the camera path,
 * each mover overlaid where its path puts it at the frame's time, then the look. Movers are overlays, not drawbox:
 * overlay evaluates its position on every frame (eval=frame), while the bundled ffmpeg's drawbox evaluates it once,
 * which left the boxes standing still.
 */
function cameraGraph(
  recipe: Pick<DemoClipRecipe, 'x' | 'y' | 'movers' | 'look'>,
  input: string,
  output: string,
): string {
  const movers = recipe.movers ?? [];
  const parts = [`[${input}]crop=${FRAME.width}:${FRAME.height}:x='${recipe.x}':y='${recipe.y}'[${output}0]`];
  movers.forEach((mover, i) => {
    parts.push(
      `color=c=0x${mover.colour}@${MOVER_OPACITY}:s=${mover.width}x${mover.height}:r=${FRAME.rate},` +
        `format=rgba[${output}m${i}]`,
      `[${output}${i}][${output}m${i}]overlay=x='${mover.x}':y='${mover.y}':eval=frame:shortest=1[${output}${i + 1}]`,
    );
  });
  const finish = [recipe.look, 'format=yuv420p'].filter(Boolean).join(',');
  parts.push(`[${output}${movers.length}]${finish}[${output}]`);
  return parts.join(';');
}

/** Renders one demo clip (H.264, 640×360, 25 frames/s) into `dir`. */
export async function renderDemoClip(dir: string, recipe: DemoClipRecipe): Promise<string> {
  const file = path.join(dir, recipe.file);
  const texture = await renderTexture(dir, recipe.textureSeed);
  const encode = ['-c:v', 'libx264', '-preset', 'veryfast', '-crf', '20', '-movflags', '+faststart'];
  if (recipe.cutAtS === undefined) {
    await run(ffmpegInstaller.path, [
      '-v',
      'error',
      '-y',
      '-loop',
      '1',
      '-framerate',
      String(FRAME.rate),
      '-i',
      texture,
      '-filter_complex',
      cameraGraph(recipe, '0', 'v'),
      '-map',
      '[v]',
      '-t',
      String(recipe.seconds),
      ...encode,
      file,
    ]);
    return file;
  }
  const other = await renderTexture(dir, recipe.textureSeed + 100);
  const first = recipe.cutAtS;
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-loop',
    '1',
    '-framerate',
    String(FRAME.rate),
    '-t',
    String(first),
    '-i',
    texture,
    '-loop',
    '1',
    '-framerate',
    String(FRAME.rate),
    '-t',
    String(recipe.seconds - first),
    '-i',
    other,
    '-filter_complex',
    `${cameraGraph(recipe, '0', 'a')};${cameraGraph({ x: '500+t*25', y: '300' }, '1', 'b')};` +
      '[a][b]concat=n=2:v=1[v]',
    '-map',
    '[v]',
    ...encode,
    file,
  ]);
  return file;
}

/** The near-duplicate: an already rendered clip exported again at a lower quality. */
export async function renderDuplicate(dir: string): Promise<string> {
  const file = path.join(dir, DEMO_DUPLICATE.file);
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-i',
    path.join(dir, DEMO_DUPLICATE.of),
    '-c:v',
    'libx264',
    '-preset',
    'veryfast',
    '-crf',
    String(DEMO_DUPLICATE.crf),
    file,
  ]);
  return file;
}

export function writeNotAVideo(dir: string): string {
  const file = path.join(dir, DEMO_NOT_A_VIDEO.file);
  fs.writeFileSync(file, DEMO_NOT_A_VIDEO.text);
  return file;
}
