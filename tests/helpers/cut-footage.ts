// The cut evaluation set: clips rendered by ffmpeg from the demo's procedural foliage textures, each with its known
// transitions, and their frames sampled as the pipeline samples them (5 frames/s, 320 px, BT.601 grey). Nothing of
// it is committed as video: the generator renders it afresh into a temporary folder.
import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import { rgbToGrey } from '../../shared/colour/grey';
import { renderTexture } from '../../server/demo/footage';

const run = promisify(execFile);

export const SOURCE_RATE = 25;
export const SAMPLE_FPS = 5;
export const SAMPLED = { width: 320, height: 180 };
const WINDOW = { width: 640, height: 360 };

/** A transition in source seconds: a hard cut has from = to (the first time of the new shot). */
export interface KnownTransition {
  fromS: number;
  toS: number;
}

export interface CutScenario {
  name: string;
  /** What the clip holds, for failure messages. */
  about: string;
  transitions: KnownTransition[];
  /** ffmpeg arguments after the texture inputs (textures are inputs 0..n−1, in `textures` order). */
  textures: number[];
  graph: (shot: ShotFilters) => string;
  seconds: number;
}

interface ShotFilters {
  /** A window over input `input` lasting `seconds`, camera expressions in source frames `n`. */
  shot(input: number, seconds: number, x: string, y: string, look?: string): string;
}

const shotFilters: ShotFilters = {
  shot(input, seconds, x, y, look) {
    const crop = `crop=${WINDOW.width}:${WINDOW.height}:x='${x}':y='${y}'`;
    return (
      `[${input}:v]trim=duration=${seconds},setpts=PTS-STARTPTS,${crop}${look ? `,${look}` : ''},` +
      'setsar=1,format=yuv420p'
    );
  },
};

/** A zoom in about the texture's centre, `factor` times in `zoomS` seconds, then held. */
function zoomShot(input: number, seconds: number, factor: number, zoomS: number): string {
  const frames = zoomS * SOURCE_RATE;
  return (
    `[${input}:v]trim=duration=${seconds},setpts=PTS-STARTPTS,` +
    `zoompan=z='min(pow(${factor},on/${frames}),${factor})':d=1:x='iw/2-iw/zoom/2':y='ih/2-ih/zoom/2':` +
    `s=${WINDOW.width}x${WINDOW.height}:fps=${SOURCE_RATE},setsar=1,format=yuv420p`
  );
}

const concat = (parts: string[]) =>
  `${parts.map((part, k) => `${part}[s${k}]`).join(';')};${parts.map((_, k) => `[s${k}]`).join('')}` +
  `concat=n=${parts.length}:v=1[v]`;

const slowPan = (from: number) => `${from}+n*2`;
const LOOK_WARM = 'colorchannelmixer=rr=1.1:gg=0.8:bb=0.6';
const LOOK_DUSK = 'eq=brightness=-0.12:saturation=0.6';

/**
 * Every scenario of the set. Times: 25 frames/s sources, so a cut at 2 s is the 10th sampled frame. Textures are
 * the demo's (renderTexture): seeds of one formula share their colours, so cuts between them are cuts between
 * shots of similar colour.
 */
export const CUT_SCENARIOS: readonly CutScenario[] = [
  {
    name: 'hard-cuts',
    about: 'three different scenes, cut at 2 s and 4 s',
    textures: [11, 12, 13],
    seconds: 6,
    transitions: [
      { fromS: 2, toS: 2 },
      { fromS: 4, toS: 4 },
    ],
    graph: ({ shot }) =>
      concat([
        shot(0, 2, slowPan(100), '200'),
        shot(1, 2, slowPan(500), '100', LOOK_WARM),
        shot(2, 2, '300', slowPan(50), LOOK_DUSK),
      ]),
  },
  {
    name: 'similar-colour',
    about: 'two shots of one kind of foliage, same colours, cut at 3 s',
    textures: [21, 121],
    seconds: 6,
    transitions: [{ fromS: 3, toS: 3 }],
    graph: ({ shot }) => concat([shot(0, 3, slowPan(200), '200'), shot(1, 3, slowPan(500), '300')]),
  },
  {
    name: 'jump-camera',
    about: 'one scene, the camera jumps to another part of it at 2.4 s and 4.8 s',
    textures: [31],
    seconds: 7,
    transitions: [
      { fromS: 2.4, toS: 2.4 },
      { fromS: 4.8, toS: 4.8 },
    ],
    graph: ({ shot }) =>
      concat([shot(0, 2.4, slowPan(100), '100'), shot(0, 2.4, slowPan(700), '400'), shot(0, 2.2, slowPan(300), '500')]),
  },
  {
    name: 'jump-time',
    about: 'a still camera; time skipped at 3 s: the light changed and the camera was bumped',
    textures: [41],
    seconds: 6,
    transitions: [{ fromS: 3, toS: 3 }],
    graph: ({ shot }) => concat([shot(0, 3, '400', '250'), shot(0, 3, '430', '262', 'eq=brightness=0.08:gamma=0.9')]),
  },
  {
    name: 'fade',
    about: 'a fade out to black from 2.4 s and in from black until 3.4 s',
    textures: [51, 52],
    seconds: 6,
    transitions: [{ fromS: 2.4, toS: 3.4 }],
    graph: ({ shot }) =>
      concat([
        shot(0, 2.9, slowPan(100), '100', 'fade=t=out:st=2.4:d=0.5'),
        shot(1, 3.1, slowPan(400), '300', `${LOOK_WARM},fade=t=in:st=0:d=0.5`),
      ]),
  },
  {
    name: 'dissolve',
    about: 'a dissolve between two shots from 2.4 s to 3.4 s',
    textures: [61, 62],
    seconds: 6,
    transitions: [{ fromS: 2.4, toS: 3.4 }],
    graph: ({ shot }) =>
      `${shot(0, 6, slowPan(100), '100')}[a];${shot(1, 6, slowPan(400), '300', LOOK_DUSK)}[b];` +
      "[a][b]blend=all_expr='A*(1-clip(T-2.4,0,1))+B*clip(T-2.4,0,1)'[v]",
  },
  {
    name: 'flash',
    about: 'one shot with a bright flash at 3 s (five source frames, one sampled frame): no cut',
    textures: [71],
    seconds: 6,
    transitions: [],
    graph: ({ shot }) => `${shot(0, 6, slowPan(100), '200', "eq=brightness=0.6:enable='between(t,2.91,3.09)'")}[v]`,
  },
  {
    name: 'fast-pan',
    about: 'one shot panning ever faster, up to a fifth of the picture per sampled frame: no cut',
    textures: [81],
    seconds: 5,
    transitions: [],
    graph: ({ shot }) => `${shot(0, 5, '20+n*n*0.18', '150+40*sin(n/9)')}[v]`,
  },
  {
    name: 'fast-zoom',
    about: 'one shot zooming in fourfold in 2 s, 15 % a sampled frame: no cut',
    textures: [91],
    seconds: 4,
    transitions: [],
    graph: () => `${zoomShot(0, 4, 4, 2)}[v]`,
  },
  {
    name: 'handheld',
    about: 'a handheld close-up: large, fast, irregular camera motion, no cut',
    textures: [101],
    seconds: 6,
    transitions: [],
    graph: ({ shot }) => `${shot(0, 6, '450+160*sin(n/8)+25*sin(n/2.3)', '250+70*sin(n/6.5)+15*cos(n/1.9)')}[v]`,
  },
  {
    name: 'handheld-cut',
    about: 'two handheld close-ups of one kind of foliage, cut at 3 s',
    textures: [111, 211],
    seconds: 6,
    transitions: [{ fromS: 3, toS: 3 }],
    graph: ({ shot }) =>
      concat([
        shot(0, 3, '450+160*sin(n/8)+25*sin(n/2.3)', '250+70*sin(n/6.5)+15*cos(n/1.9)'),
        shot(1, 3, '500+150*sin(n/7+1)+25*sin(n/2.1)', '300+60*sin(n/6)+15*cos(n/1.7)'),
      ]),
  },
  {
    name: 'pan-cut',
    about: 'a fast pan cut to another fast pan the other way at 2.4 s',
    textures: [121, 122],
    seconds: 5,
    transitions: [{ fromS: 2.4, toS: 2.4 }],
    graph: ({ shot }) => concat([shot(0, 2.4, '50+n*12', '200'), shot(1, 2.6, '900-n*12', '250', LOOK_WARM)]),
  },
];

export interface SampledClip {
  width: number;
  height: number;
  /** BT.601 grey 0..255 of each sampled frame, as the pipeline's signals stage reads its frames. */
  frames: Float32Array[];
}

/** Renders one scenario (H.264 at 25 frames/s) and samples it at 5 frames/s and 320 px. */
export async function renderScenario(dir: string, scenario: CutScenario): Promise<SampledClip> {
  const textures = await Promise.all(scenario.textures.map((seed) => renderTexture(dir, seed)));
  const file = path.join(dir, `${scenario.name}.mp4`);
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    ...textures.flatMap((texture) => ['-loop', '1', '-framerate', String(SOURCE_RATE), '-i', texture]),
    '-filter_complex',
    scenario.graph(shotFilters),
    '-map',
    '[v]',
    '-t',
    String(scenario.seconds),
    '-c:v',
    'libx264',
    '-preset',
    'veryfast',
    '-crf',
    '20',
    file,
  ]);
  const { stdout } = await run(
    ffmpegInstaller.path,
    [
      '-v',
      'error',
      '-i',
      file,
      '-vf',
      `fps=${SAMPLE_FPS},scale=${SAMPLED.width}:${SAMPLED.height}:flags=area`,
      '-pix_fmt',
      'rgb24',
      '-f',
      'rawvideo',
      'pipe:1',
    ],
    { encoding: 'buffer', maxBuffer: 1 << 28 },
  );
  const frameBytes = SAMPLED.width * SAMPLED.height * 3;
  const frames: Float32Array[] = [];
  for (let o = 0; o + frameBytes <= stdout.length; o += frameBytes) {
    const rgb = new Uint8Array(stdout.buffer, stdout.byteOffset + o, frameBytes);
    frames.push(rgbToGrey(rgb, new Float32Array(SAMPLED.width * SAMPLED.height)));
  }
  return { ...SAMPLED, frames };
}

/** A transition's sampled frames: a cut before frame `first`, frames first..last inside a gradual one. */
export function sampledSpan({ fromS, toS }: KnownTransition): { first: number; last: number } {
  return { first: Math.round(fromS * SAMPLE_FPS), last: Math.round(toS * SAMPLE_FPS) };
}
