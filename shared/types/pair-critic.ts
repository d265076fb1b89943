import type { CriticOptions, CurvePoint } from '../pairing/contrastive-critic';
import type { CriticBound } from '../pairing/critic-bound';
import type { PairKind } from '../pairing/pairing-graph';

export type CriticReading = 'trivial' | 'shared' | 'nothing-found' | 'no-held-out' | 'too-few';

/** One K of a view pair's trained-critic report (bounds in nats). */
export interface CriticKResult {
  k: number;
  logK: number;
  /** On held-out pairs (val split): the figure to read. Null when they do not fill a batch of K. */
  heldOut: CriticBound | null;
  /** On the training sample: how well the critic fits what it saw; not a bound on anything. */
  train: CriticBound | null;
  /** The untrained fixed embedding on the same held-out pairs: the floor a trained critic should beat. */
  floor: { meanLoss: number; bound: number } | null;
}

export interface CriticTrainingSummary {
  steps: number;
  /** Pairs per training batch. */
  batch: number;
  fitPairs: number;
  stopPairs: number;
  /** The step whose weights the report uses (lowest loss on the stopping pairs; 0 = untrained). */
  keptStep: number;
  curve: CurvePoint[];
}

/** The trained-critic report of one view pair. */
export interface PairKindCritic {
  kind: PairKind;
  /** One encoder for both views (two pictures of the same kind, such as a frame and its neighbour). */
  tied: boolean;
  trainPairs: number;
  trainClips: number;
  heldOutPairs: number;
  heldOutClips: number;
  /** Null when the train split gives too few pairs to train on. */
  training: CriticTrainingSummary | null;
  results: CriticKResult[];
  reading: CriticReading;
  message: string;
}

/** The trained-critic part of a pairset's difficulty report (pairset.json `difficulty.critic`). */
export interface PairsetCritic {
  description: string;
  descriptor: { cells: number; gradientSize: number; length: number };
  /** The settings every view pair's critic shares (τ is the report's; tying is per view pair). */
  options: Omit<CriticOptions, 'temperature' | 'seed' | 'tied'>;
  /** Most pairs drawn from each split per view pair. */
  sampleLimit: number;
  kinds: PairKindCritic[];
}
