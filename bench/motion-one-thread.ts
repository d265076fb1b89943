/**
 * The motion benchmark's one-thread timing, in a process of its own: `node --import tsx bench/motion-one-thread.ts
 * <pair base> <width> <height> <runs>` reads the pair's frames and truth as raw float32 files (<base>-a.f32,
 * -b.f32, -truth.f32) and prints, as JSON, the median ms per pair and the AEE of every estimator. A process of its
 * own because the figures came out 20–25 % slower in the process that also holds the benchmark's thread pool (and
 * sharp), while native OpenCV runs in a process of its own as well.
 */
import fs from 'node:fs';
import { averageErrors } from '../worker/motion/fields/error-measures';
import { estimateMotion, resolveParams } from '../worker/motion/index';
import { ESTIMATORS, type EstimatorName } from '../shared/estimators';
import { MotionWorkspace } from '../worker/motion/kernels/workspace';

export type OneThreadFigures = Record<EstimatorName, { ms: number; aee: number }>;

const [base, widthArg, heightArg, runsArg] = process.argv.slice(2);
const width = Number(widthArg);
const height = Number(heightArg);
const runs = Math.max(1, Number(runsArg));
const read = (suffix: string) => {
  const bytes = fs.readFileSync(`${base}-${suffix}.f32`);
  return new Float32Array(bytes.buffer, bytes.byteOffset, bytes.byteLength / 4);
};
const prev = read('a');
const next = read('b');
const truth = read('truth');

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

const workspace = new MotionWorkspace();
const out = new Float32Array(2 * width * height);
const figures = {} as OneThreadFigures;
for (const estimator of ESTIMATORS) {
  const params = resolveParams(estimator);
  estimateMotion(estimator, prev, next, width, height, params, workspace, out);
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const start = performance.now();
    estimateMotion(estimator, prev, next, width, height, params, workspace, out);
    times.push(performance.now() - start);
  }
  figures[estimator] = { ms: median(times), aee: averageErrors(out, truth, width, height).aee };
}
process.stdout.write(JSON.stringify(figures));
