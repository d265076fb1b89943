import { DEFAULT_CRITIC } from '../../shared/pairing/contrastive-critic';
import { readCritic } from '../../shared/pairing/critic-reading';
import { pairDifficulty } from '../../shared/pairing/pair-difficulty';
import type { PairKind } from '../../shared/pairing/pairing-graph';
import { fmix32, fnv1a32 } from '../../shared/pairing/seeded-random';
import { DESCRIPTOR_CELLS, DESCRIPTOR_GRADIENT_SIZE, DESCRIPTOR_LENGTH } from '../../shared/pairing/view-descriptor';
import type { PairKindCritic, PairsetCritic } from '../../shared/types/pair-critic';
import type { FramePool } from '../pool/frame-pool';
import type { DescriptorPairs } from '../pool/critic-tasks';

/** Pairs drawn per view pair from each split for the critic: its training sample and its held-out sample. */
export const CRITIC_SAMPLE = 512;

const CRITIC_DESCRIPTION =
  'For each view pair, two linear encoders (one per view) over a 128-value descriptor of ' +
  'each view (its grey plane as for the fixed embedding, shrunk to an 8 × 8 layout, and the 8 × 8 map of its ' +
  "gradient energy, each half standardised) are trained with InfoNCE at the pairset's τ over in-batch negatives, " +
  `on up to ${CRITIC_SAMPLE} pairs of the train split, for a fixed number of Adam steps; a quarter of the training ` +
  'clips is set aside to choose the step to keep. The bound log K − loss is then measured on up to ' +
  `${CRITIC_SAMPLE} pairs of the val split, clips the critic never saw, beside the untrained fixed embedding on ` +
  'the same pairs.';

/** A view's fixed embedding (for the floor) and its descriptor (what the critic reads). */
export interface EmbeddedView {
  fixed: Float32Array;
  descriptor: Float32Array;
}

export interface EmbeddedPair {
  clipId: number;
  a: EmbeddedView;
  b: EmbeddedView;
}

export interface CriticInput {
  kind: PairKind;
  /** Both views are pictures of the same kind (frame and neighbour): one encoder serves both. */
  tied: boolean;
  train: EmbeddedPair[];
  heldOut: EmbeddedPair[];
}

export interface CriticReportOptions {
  pool: FramePool;
  signal?: AbortSignal;
  temperature: number;
  /** The pairset's split seed; each view pair's training seed is derived from it and the view pair's name. */
  seed: number;
  ks: number[];
}

/**
 * The trained-critic part of the difficulty report: every view pair's critic is trained as its own pool task, all
 * at once, so the pool's threads share them; each one's figures do not depend on how they are shared.
 */
export async function criticReport(
  inputs: readonly CriticInput[],
  options: CriticReportOptions,
): Promise<PairsetCritic> {
  const outcomes = await Promise.all(
    inputs.map((input) =>
      options.pool.trainCritic(
        {
          train: descriptorPairs(input.train),
          heldOut: descriptorPairs(input.heldOut),
          ks: options.ks,
          options: {
            ...DEFAULT_CRITIC,
            tied: input.tied,
            temperature: options.temperature,
            seed: fmix32(options.seed ^ fnv1a32(input.kind)),
          },
          measureSeed: options.seed,
        },
        options.signal,
      ),
    ),
  );
  const kinds = inputs.map((input, n): PairKindCritic => {
    const outcome = outcomes[n]!;
    const results = outcome.results.map(({ k, heldOut, train }) => {
      const floor = pairDifficulty(
        input.heldOut.map((pair) => pair.a.fixed),
        input.heldOut.map((pair) => pair.b.fixed),
        k,
        { temperature: options.temperature, seed: options.seed },
      );
      return {
        k,
        logK: Math.log(k),
        heldOut,
        train,
        floor: floor && { meanLoss: floor.meanLoss, bound: floor.bound },
      };
    });
    const counts = {
      trainPairs: input.train.length,
      trainClips: new Set(input.train.map((pair) => pair.clipId)).size,
      heldOutPairs: input.heldOut.length,
      heldOutClips: new Set(input.heldOut.map((pair) => pair.clipId)).size,
    };
    return {
      kind: input.kind,
      tied: input.tied,
      ...counts,
      training: outcome.training,
      results,
      ...readCritic({ results, trained: outcome.training !== null, smallestK: Math.min(...options.ks), ...counts }),
    };
  });
  return {
    description: CRITIC_DESCRIPTION,
    descriptor: { cells: DESCRIPTOR_CELLS, gradientSize: DESCRIPTOR_GRADIENT_SIZE, length: DESCRIPTOR_LENGTH },
    options: { ...DEFAULT_CRITIC },
    sampleLimit: CRITIC_SAMPLE,
    kinds,
  };
}

function descriptorPairs(pairs: readonly EmbeddedPair[]): DescriptorPairs {
  return {
    a: pairs.map((pair) => pair.a.descriptor),
    b: pairs.map((pair) => pair.b.descriptor),
    clips: pairs.map((pair) => pair.clipId),
  };
}
