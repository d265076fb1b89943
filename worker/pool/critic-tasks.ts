/**
 * The pair-difficulty report's training in the worker-thread pool: one task trains the critic of one view pair
 * (shared/pairing/contrastive-critic.ts) and measures its InfoNCE bound at each K on the held-out and on the
 * training sample. One task runs on one thread, so a report with several view pairs uses both cores while each
 * critic stays bit-for-bit the same whatever the number of threads.
 */
import { MIN_PAIRS, trainCritic, type CriticOptions } from '../../shared/pairing/contrastive-critic';
import { criticBound, type CriticBound } from '../../shared/pairing/critic-bound';
import type { CriticTrainingSummary } from '../../shared/types/pair-critic';

/** Pairs of descriptors, view a and view b, with the clip of each pair. */
export interface DescriptorPairs {
  a: Float32Array[];
  b: Float32Array[];
  clips: number[];
}

export interface CriticTask {
  kind: 'critic';
  train: DescriptorPairs;
  heldOut: DescriptorPairs;
  ks: number[];
  options: CriticOptions;
  /** Seed of the batch order of the measurement. */
  measureSeed: number;
}

export interface CriticOutcome {
  /** Null when the training sample is too small to train on. */
  training: CriticTrainingSummary | null;
  results: { k: number; heldOut: CriticBound | null; train: CriticBound | null }[];
}

export function runCriticTask(task: CriticTask): CriticOutcome {
  if (task.train.a.length < MIN_PAIRS) {
    return { training: null, results: task.ks.map((k) => ({ k, heldOut: null, train: null })) };
  }
  const trained = trainCritic(task.train.a, task.train.b, task.train.clips, task.options);
  const { critic } = trained;
  return {
    training: {
      steps: task.options.steps,
      batch: trained.batch,
      fitPairs: trained.fitPairs,
      stopPairs: trained.stopPairs,
      keptStep: trained.keptStep,
      curve: trained.curve,
    },
    results: task.ks.map((k) => ({
      k,
      heldOut: criticBound(critic, task.heldOut.a, task.heldOut.b, k, task.measureSeed),
      train: criticBound(critic, task.train.a, task.train.b, k, task.measureSeed),
    })),
  };
}
