import sharp, { type OverlayOptions } from 'sharp';
import { MOVER_OPACITY, renderTexture } from '../../server/demo/footage';
import { DEMO_CLIPS, DEMO_VERDICTS, type DemoClipRecipe } from '../../server/demo/scenario';
import { PROJECT_DEFAULTS } from '../../server/core/projects/projects';
import { rgbToGrey } from '../../shared/colour/grey';
import type { EstimatorName } from '../../shared/estimators';
import { ESTIMATOR_REGISTRY, type EstimatorEntry, type EstimatorParams } from '../../worker/motion/index';

/**
 * The demo pairset's footage without the demo's ffmpeg encode and worker pipeline: for each accepted clip of the
 * demo pairset's project, the demo's own procedural texture (server/demo/footage.ts) seen through the demo camera
 * path, sampled at the project defaults (5 frames/s, 320 px working size), the demo's movers (trolley, crate,
 * balloon) drawn where the recipe puts them, and the forward field of each neighbour pair from the projects' default
 * estimator with its default parameters. Differences from a real demo start: no H.264 round trip, no scaling
 * filter of ffmpeg and the overlay's blending done in RGB, so fields and frames differ in detail, not in kind.
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

/** The accepted clips of the demo pairset's project (project 0 of the scenario), in scenario order. */
export function demoPairsetRecipes(): DemoClipRecipe[] {
  const accepted = new Set(DEMO_VERDICTS.filter((v) => v.decision === 'accept').map((v) => v.file));
  return DEMO_CLIPS.filter((recipe) => recipe.project === 0 && accepted.has(recipe.file));
}

export async function demoLikeClip(dir: string, recipe: DemoClipRecipe): Promise<DemoLikeClip> {
  const texture = await renderTexture(dir, recipe.textureSeed);
  const x = timeFunction(recipe.x);
  const y = timeFunction(recipe.y);
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
    const overlays = moverOverlays(recipe, t);
    const source = overlays.length > 0 ? sharp(await window.png().toBuffer()).composite(overlays) : window;
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

/**
 * A demo expression of t (camera path or mover position) as a function: only numbers, t, +, −, *, /, sin and mod.
 * The demo only takes mod of non-negative values (t ≥ 0, positive speeds), where the floored remainder used here
 * and a truncated one agree.
 */
function timeFunction(expression: string): (t: number) => number {
  if (!/^[0-9t+\-*/(). ,]*$/.test(expression.replace(/sin|mod/g, ''))) {
    throw new Error(`unsupported demo expression ${expression}`);
  }
  const body = expression.replace(/sin/g, 'Math.sin').replace(/mod/g, 'floorMod');
  const evaluate = new Function('t', 'floorMod', `return ${body};`) as (t: number, m: typeof floorMod) => number;
  return (t) => evaluate(t, floorMod);
}

function floorMod(x: number, y: number): number {
  return x - y * Math.floor(x / y);
}

/**
 * The recipe's movers as sharp overlays at time t: each box where the demo's ffmpeg overlay puts it (at whole
 * pixels), cut to the frame, at the demo's opacity; none for a box wholly outside the frame.
 */
function moverOverlays(recipe: DemoClipRecipe, t: number): OverlayOptions[] {
  return (recipe.movers ?? []).flatMap((mover) => {
    const x = Math.trunc(timeFunction(mover.x)(t));
    const y = Math.trunc(timeFunction(mover.y)(t));
    const left = Math.max(0, x);
    const top = Math.max(0, y);
    const width = Math.min(SOURCE.width, x + mover.width) - left;
    const height = Math.min(SOURCE.height, y + mover.height) - top;
    if (width <= 0 || height <= 0) return [];
    const [r, g, b] = [0, 2, 4].map((i) => parseInt(mover.colour.slice(i, i + 2), 16));
    const background = { r: r!, g: g!, b: b!, alpha: MOVER_OPACITY };
    return [{ input: { create: { width, height, channels: 4 as const, background } }, left, top }];
  });
}
