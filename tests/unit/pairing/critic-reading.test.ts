import { describe, expect, it } from 'vitest';
import { readCritic, type CriticReadingInput } from '../../../shared/pairing/critic-reading';
import type { CriticKResult } from '../../../shared/types/pair-critic';

/** A result at K with the held-out bound `bound` (null: the held-out pairs do not fill K) and a floor. */
function result(k: number, bound: number | null, floor: number | null = null): CriticKResult {
  const logK = Math.log(k);
  const figure = (value: number) => ({ k, batches: 1, anchors: 2 * k, meanLoss: logK - value, logK, bound: value });
  return {
    k,
    logK,
    heldOut: bound === null ? null : figure(bound),
    train: figure(logK / 2),
    floor: floor === null ? null : { meanLoss: logK - floor, bound: floor },
  };
}

const input = (results: CriticKResult[], extra: Partial<CriticReadingInput> = {}): CriticReadingInput => ({
  results,
  trained: true,
  trainPairs: 300,
  trainClips: 6,
  heldOutPairs: 80,
  smallestK: 16,
  ...extra,
});

describe('reading a trained-critic report', () => {
  it('reads the largest K the held-out pairs fill', () => {
    // 64 fills, 256 does not: the reading is at K = 64, log 64 = 4.159 nats.
    const reading = readCritic(input([result(16, 2.6), result(64, 4.0), result(256, null)]));
    expect(reading.reading).toBe('trivial');
    expect(reading.message).toContain('out of 64 candidates');
    expect(reading.message).toContain('4.00 nats of log K = 4.16 nats');
  });

  it('reads a bound between 5 % and 90 % of log K as shared structure, a lower bound', () => {
    const reading = readCritic(input([result(16, 1.2)]));
    expect(reading.reading).toBe('shared');
    expect(reading.message).toMatch(/at least 1\.20 nats .* lower bound/);
  });

  it('reads a bound near 0 as nothing found, not as unrelated views, and writes no −0.00', () => {
    const reading = readCritic(input([result(16, -0.003, -0.92)]));
    expect(reading.reading).toBe('nothing-found');
    expect(reading.message).toContain('(0.00 nats at K = 16)');
    expect(reading.message).toContain('does not show the views are unrelated');
    expect(reading.message).not.toContain('untrained embedding does better');
  });

  it('says when the untrained floor is higher than the critic', () => {
    expect(readCritic(input([result(16, 1.96, 2.2)])).message).toContain('untrained embedding does better');
  });

  it('says why there is no figure: too few val pairs, or too few train pairs', () => {
    expect(readCritic(input([result(16, null)], { heldOutPairs: 9 }))).toMatchObject({
      reading: 'no-held-out',
      message: expect.stringContaining('9 pairs'),
    });
    expect(readCritic(input([result(16, null)], { trained: false, trainPairs: 3 })).reading).toBe('too-few');
  });
});
