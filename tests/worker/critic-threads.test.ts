import { afterAll, describe, expect, it } from 'vitest';
import { mulberry32, standardNormal } from '../../shared/pairing/seeded-random';
import { criticReport, type CriticInput, type EmbeddedPair } from '../../worker/pairsets/critic-report';
import { createFramePool, type FramePool } from '../../worker/pool/frame-pool';

/** Pairs of views that share a little, from 6 clips: b = 0.5·a + noise in both representations. */
function pairs(count: number, seed: number): EmbeddedPair[] {
  const random = mulberry32(seed);
  const vector = (length: number) => Float32Array.from({ length }, () => standardNormal(random));
  return Array.from({ length: count }, (_, i) => {
    const a = { fixed: vector(8), descriptor: vector(12) };
    const b = {
      fixed: a.fixed.map((v) => 0.5 * v + standardNormal(random)),
      descriptor: a.descriptor.map((v) => 0.5 * v + standardNormal(random)),
    };
    return { clipId: i % 6, a, b };
  });
}

const inputs: CriticInput[] = [
  { kind: 'frame~luma', tied: false, train: pairs(96, 1), heldOut: pairs(40, 2) },
  { kind: 'frame~neighbour+1', tied: true, train: pairs(96, 3), heldOut: pairs(40, 4) },
  { kind: 'frame~motion', tied: false, train: pairs(80, 5), heldOut: pairs(20, 6) },
];
const pools: FramePool[] = [];

afterAll(async () => {
  await Promise.all(pools.map((pool) => pool.destroy()));
});

describe('critics in the worker-thread pool', () => {
  it('give the same report with one thread as with two', async () => {
    const report = (threads: number) => {
      const pool = createFramePool(threads);
      pools.push(pool);
      return criticReport(inputs, { pool, temperature: 0.07, seed: 9, ks: [16, 64] });
    };
    const [one, two] = await Promise.all([report(1), report(2)]);
    expect(two).toEqual(one);
    expect(one.kinds.map((kind) => kind.results[0]!.heldOut !== null)).toEqual([true, true, true]);
    // 20 held-out pairs fill a batch of 16 but not one of 64.
    expect(one.kinds[2]!.results[1]!.heldOut).toBeNull();
  });
});
