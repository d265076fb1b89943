/**
 * Cut evidence benchmark (not a test): the cost the cut detector adds per neighbour pair (thumbs, global shift, edge
 * change and, where the shift does not explain the pair and it is not quiet, two coarse Farnebäck fields), against the Motion stage's
 * own work on the same pair in the same run (the project default estimator, forward and backward at the 320 px
 * working size). Frames come from the generated cut set (tests/helpers/cut-footage.ts); the first clip is measured
 * twice and its first pass, which warms the code up, is left out.
 *   npx tsx bench/cut-evidence.ts
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { estimateMotion } from '../worker/motion/index';
import { MotionWorkspace } from '../worker/motion/kernels/workspace';
import { cutThumb, pairEvidence } from '../worker/signals/cut-evidence';
import { greyHistogram, histogramCorrelation } from '../worker/signals/cuts';
import { CUT_SCENARIOS, renderScenario } from '../tests/helpers/cut-footage';

const SCENARIOS = ['fast-pan', 'fast-pan', 'handheld', 'hard-cuts', 'fast-zoom'];
const REFERENCE_ESTIMATOR = 'dis';
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-cuts-'));

try {
  let cutMs = 0;
  let motionMs = 0;
  let pairs = 0;
  for (const [round, name] of SCENARIOS.entries()) {
    const clip = await renderScenario(
      work,
      CUT_SCENARIOS.find((scenario) => scenario.name === name)!,
    );
    const workspace = new MotionWorkspace();
    // Histograms were measured before this detector too (cuts.ts); only what it adds is timed.
    const histograms = clip.frames.map((grey) => greyHistogram(grey));
    const cutStart = performance.now();
    const thumbs = clip.frames.map((grey) => cutThumb(grey, clip.width, clip.height));
    let hint: { dx: number; dy: number } | null = null;
    for (let k = 1; k < thumbs.length; k += 1) {
      const histogramDistance = 1 - histogramCorrelation(histograms[k - 1]!, histograms[k]!);
      hint = pairEvidence(thumbs[k - 1]!, thumbs[k]!, workspace, hint, histogramDistance).shift;
    }
    const cutTook = performance.now() - cutStart;
    const motionWorkspace = new MotionWorkspace();
    const motionStart = performance.now();
    for (let k = 1; k < clip.frames.length; k += 1) {
      estimateMotion(
        REFERENCE_ESTIMATOR,
        clip.frames[k - 1]!,
        clip.frames[k]!,
        clip.width,
        clip.height,
        {},
        motionWorkspace,
      );
      estimateMotion(
        REFERENCE_ESTIMATOR,
        clip.frames[k]!,
        clip.frames[k - 1]!,
        clip.width,
        clip.height,
        {},
        motionWorkspace,
      );
    }
    const motionTook = performance.now() - motionStart;
    const count = clip.frames.length - 1;
    if (round === 0) continue;
    console.log(
      `${name}: ${count} pairs; cut evidence ${(cutTook / count).toFixed(2)} ms a pair, ` +
        `${REFERENCE_ESTIMATOR} both ways ${(motionTook / count).toFixed(2)} ms a pair, ` +
        `ratio ${(cutTook / motionTook).toFixed(3)}`,
    );
    cutMs += cutTook;
    motionMs += motionTook;
    pairs += count;
  }
  console.log(
    `all ${pairs} pairs: cut evidence ÷ motion fields = ${(cutMs / motionMs).toFixed(3)} ` +
      '(the Motion stage also reads frames, checks consistency, summarises and writes files: its full cost is more)',
  );
} finally {
  fs.rmSync(work, { recursive: true, force: true });
}
