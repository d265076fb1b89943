/**
 * Trained-critic benchmark (not a test): the extra time the pair-difficulty report spends per view pair on its
 * critic, at the largest sample a build draws (512 train and 512 held-out pairs of 128-value descriptors), against
 * the issue's budget of 10 s per view pair on 2 cores. In the same run, as the reference, the untrained fixed
 * embedding's InfoNCE over the same number of pairs. Reports: one critic on one thread; two view pairs' critics at
 * once in the real worker-thread pool with 2 threads (what a two-view-pair build does); ratios to the budget.
 *   npm run bench:critic
 */
import { DEFAULT_CRITIC } from '../shared/pairing/contrastive-critic';
import { pairDifficulty } from '../shared/pairing/pair-difficulty';
import { mulberry32, standardNormal } from '../shared/pairing/seeded-random';
import { DESCRIPTOR_LENGTH } from '../shared/pairing/view-descriptor';
import { runCriticTask, type CriticTask, type DescriptorPairs } from '../worker/pool/critic-tasks';
import { createFramePool } from '../worker/pool/frame-pool';

const PAIRS = 512;
const CLIPS = 8;
const BUDGET_S = 10;
const KS = [16, 64, 256];

/** Descriptor pairs that share a little: b = 0.3·a + noise, both of the report's descriptor length. */
function pairs(seed: number): DescriptorPairs {
  const random = mulberry32(seed);
  const a = Array.from({ length: PAIRS }, () =>
    Float32Array.from({ length: DESCRIPTOR_LENGTH }, () => standardNormal(random)),
  );
  const b = a.map((x) => x.map((value) => 0.3 * value + standardNormal(random)));
  return { a, b, clips: a.map((_, i) => i % CLIPS) };
}

const task = (seed: number): Omit<CriticTask, 'kind'> => ({
  train: pairs(seed),
  heldOut: pairs(seed + 1),
  ks: KS,
  measureSeed: 1,
  options: { ...DEFAULT_CRITIC, tied: false, temperature: 0.07, seed },
});
const seconds = (start: bigint) => Number(process.hrtime.bigint() - start) / 1e9;

const reference = task(1);
let start = process.hrtime.bigint();
for (const k of KS) pairDifficulty(reference.heldOut.a, reference.heldOut.b, k);
const fixedS = seconds(start);

start = process.hrtime.bigint();
const cpuBefore = process.cpuUsage();
runCriticTask({ kind: 'critic', ...reference });
const oneS = seconds(start);
// CPU time of that one thread: what the critic costs on a core of its own, whatever else the machine runs.
const cpu = process.cpuUsage(cpuBefore);
const oneCpuS = (cpu.user + cpu.system) / 1e6;

const pool = createFramePool(2);
await pool.trainCritic(task(5)); // thread start and module load are not the critic's
start = process.hrtime.bigint();
await Promise.all([pool.trainCritic(task(3)), pool.trainCritic(task(4))]);
const twoS = seconds(start);
await pool.destroy();

console.log(`fixed embedding InfoNCE, ${PAIRS} pairs, K = ${KS.join(', ')}: ${fixedS.toFixed(3)} s (reference)`);
console.log(
  `one critic, one thread: ${oneS.toFixed(2)} s = ${(oneS / fixedS).toFixed(0)}× the reference, ` +
    `${(oneS / BUDGET_S).toFixed(2)}× the ${BUDGET_S} s budget; CPU time ${oneCpuS.toFixed(2)} s = ` +
    `${(oneCpuS / BUDGET_S).toFixed(2)}× the budget`,
);
console.log(
  `two view pairs in the pool (2 threads): ${twoS.toFixed(2)} s, ${(twoS / 2).toFixed(2)} s per view pair = ` +
    `${(twoS / 2 / BUDGET_S).toFixed(2)}× the budget`,
);
