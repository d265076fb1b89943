import sharp, { type OverlayOptions } from 'sharp';
import { renderTexture } from '../../server/demo/footage';
import { DEMO_CLIPS, DEMO_VERDICTS, type DemoClipRecipe } from '../../server/demo/scenario';
import { PROJECT_DEFAULTS } from '../../server/core/projects/projects';
import { rgbToGrey } from '../../shared/colour/grey';
import type { EstimatorName } from '../../shared/estimators';
import { ESTIMATOR_REGISTRY, type EstimatorEntry, type EstimatorParams } from '../../worker/motion/index';

/**
 * The demo pairset's footage without the demo's ffmpeg encode and worker pipeline: for each accepted clip of the
 * demo pairset's project, the demo's own procedural texture (server/demo/footage.ts) seen through the demo camera
 * path, sampled at the project defaults (5 frames/s, 320 px working size), the demo's picking crate drawn where the
 * recipe puts it, and the forward field of each neighbour pair from the projects' default estimator with its default
 * parameters. Differences from a real demo start: no H.264 round trip and no scaling filter of ffmpeg,
 * so fields and frames differ in detail, not in kind.
 */
export interface DemoLikeClip {
  recipe: DemoClipRecipe;
  width: number;
  height: number;
  frames: Uint8Array[];
  /** Forward field k → k + 1, u and v interleaved as in .flo. */
  fields: Float32Array[];
}

const SOURCE = { width: 640, height: 360 };
const CRATE = /drawbox=x='mod\(t\*(\d+),(\d+)\)-(\d+)':y=(\d+):w=(\d+):h=(\d+):color=0x([0-9a-f]{6})/;

/** The accepted clips of the demo pairset's project (project 0 of the scenario), in scenario order. */
export function demoPairsetRecipes(): DemoClipRecipe[] {
  const accepted = new Set(DEMO_VERDICTS.filter((v) => v.decision === 'accept').map((v) => v.file));
  return DEMO_CLIPS.filter((recipe) => recipe.project === 0 && accepted.has(recipe.file));
}

export async function demoLikeClip(dir: string, recipe: DemoClipRecipe): Promise<DemoLikeClip> {
  const texture = await renderTexture(dir, recipe.textureSeed);
  const x = pathFunction(recipe.x);
  const y = pathFunction(recipe.y);
  const scale = PROJECT_DEFAULTS.workingSize / SOURCE.width;
  const width = PROJECT_DEFAULTS.workingSize;
  const height = Math.round(SOURCE.height * scale);
  const count = Math.floor(recipe.seconds * PROJECT_DEFAULTS.sampleFps);
  const frames: Uint8Array[] = [];
  for (let index = 0; index < count; index += 1) {
    const t = index / PROJECT_DEFAULTS.sampleFps;
    const window = sharp(texture)
      .extract({
        left: Math.floor(x(t)),
        top: Math.floor(y(t)),
        width: SOURCE.width,
        height: SOURCE.height,
      })
      .removeAlpha();
    const composite = crate(recipe, t);
    const source = composite ? sharp(await window.png().toBuffer()).composite([composite]) : window;
    const { data } = await sharp(await source.png().toBuffer())
      .resize(width, height, { kernel: 'cubic' })
      .removeAlpha()
      .raw()
      .toBuffer({ resolveWithObject: true });
    frames.push(new Uint8Array(data));
  }
  const estimator = ESTIMATOR_REGISTRY[PROJECT_DEFAULTS.estimator] as EstimatorEntry<EstimatorParams[EstimatorName]>;
  const grey = frames.map((rgb) => rgbToGrey(rgb, new Float32Array(width * height)));
  const fields = grey
    .slice(1)
    .map((next, k) => estimator.estimate(grey[k]!, next, width, height, estimator.defaults).slice());
  return { recipe, width, height, frames, fields };
}

/** The recipe's camera path, an ffmpeg expression of t that uses only +, −, *, / and sin. */
function pathFunction(expression: string): (t: number) => number {
  if (!/^[0-9t+\-*/(). sin]+$/.test(expression)) throw new Error(`unsupported camera path ${expression}`);
  return new Function('t', `return ${expression.replace(/sin/g, 'Math.sin')};`) as (t: number) => number;
}

/** The demo's picking crate as a sharp overlay, where the recipe's drawbox puts it at time t. */
function crate(recipe: DemoClipRecipe, t: number): OverlayOptions | null {
  const match = recipe.look?.match(CRATE);
  if (!match) return null;
  const [, speed, period, back, top, w, h, colour] = match.map((v, i) => (i === 7 ? v : Number(v))) as number[];
  const left = ((t * speed!) % period!) - back!;
  const clipped = Math.max(0, left);
  const visible = Math.min(SOURCE.width, left + w!) - clipped;
  if (visible <= 0) return null;
  const hex = String(colour);
  const rgb = [0, 2, 4].map((i) => parseInt(hex.slice(i, i + 2), 16));
  return {
    input: {
      create: {
        width: Math.round(visible),
        height: h!,
        channels: 3,
        background: { r: rgb[0]!, g: rgb[1]!, b: rgb[2]! },
      },
    },
    left: Math.round(clipped),
    top: top!,
  };
}
