import type { PairDifficulty } from '../pairing/pair-difficulty';
import type { PairKind, ViewName } from '../pairing/pairing-graph';
import type { SplitName } from '../pairing/split';
import type { PairsetCritic } from './pair-critic';
import type { PairsetDefinition, PairsetState } from '../schemas/pairsets';
import type { ClusterBalance } from './diversity';

export interface SplitCounts {
  train: number;
  val: number;
  total: number;
}

/** One view pair of the definition and how many pairs it gives in each split. */
export interface PairKindCount extends SplitCounts {
  kind: PairKind;
  a: ViewName;
  b: ViewName;
}

/** `POST /api/pairsets/preview`: what a definition would give, before building. */
export interface PairsetPreview {
  views: ViewName[];
  kinds: PairKindCount[];
  clips: SplitCounts;
  pairs: SplitCounts;
  footageHours: SplitCounts;
  /** With a clustering in the definition: each cluster's moments before and after the balance cap. */
  clusters?: ClusterBalance;
}

/** Counts per bin between `edges[i]` and `edges[i + 1]`; `missing` counts frames without the measure. */
export interface Histogram {
  edges: number[];
  counts: number[];
  missing: number;
}

/** What a built pairset holds, shown on its page and written into pairset.json. */
export interface PairsetStatistics {
  clips: SplitCounts;
  footageHours: SplitCounts;
  pairs: SplitCounts;
  /** Moments (frames t) that give at least one pair. */
  moments: number;
  kinds: PairKindCount[];
  bySite: { site: string; clips: number; pairs: number }[];
  byProject: { projectId: number; projectName: string; clips: number; pairs: number }[];
  /** Mean motion of the field t→t+1 of each moment, px per sampled-frame step at the working size. */
  motionMagnitude: Histogram;
  /** Variance of the Laplacian of each moment's frame. */
  sharpness: Histogram;
  /** With a clustering in the definition: each cluster's moments before and after the balance cap. */
  clusters?: ClusterBalance;
}

export interface ShardSummary {
  index: number;
  file: string;
  split: SplitName;
  pairCount: number;
  bytes: number;
  sha256: string;
}

/** The pair-difficulty report of one view pair: one result per K that the sample fills. */
export interface PairKindDifficulty {
  kind: PairKind;
  /** Pairs drawn for the report. */
  sampled: number;
  results: PairDifficulty[];
}

export interface PairsetDifficulty {
  temperature: number;
  ks: number[];
  /** Most pairs drawn per view pair. */
  sampleLimit: number;
  embedding: { description: string; thumbSize: number; dims: number; seed: number };
  kinds: PairKindDifficulty[];
  /** A small critic trained per view pair, with held-out bounds; absent from pairsets built before it existed. */
  critic?: PairsetCritic;
}

export interface PairsetSummary {
  id: number;
  name: string;
  version: number;
  state: PairsetState;
  /** Share of the build done, 0..1. */
  progress: number;
  bytes: number;
  ownerId: number;
  ownerName: string;
  seed: number;
  shardCount: number;
  pairCount: number;
  error: string | null;
  createdAt: string;
  builtAt: string | null;
}

export interface PairsetDetail extends PairsetSummary {
  definition: PairsetDefinition;
  stats: PairsetStatistics | null;
  shards: ShardSummary[];
  hasDifficulty: boolean;
}

/** pairset.json: everything needed to check and read the shards months later. */
export interface PairsetManifest {
  format: string;
  pairset: { id: number; name: string; version: number };
  definition: PairsetDefinition;
  seed: number;
  shards: ShardSummary[];
  statistics: PairsetStatistics;
  difficulty: PairsetDifficulty;
}

export interface ApiTokenSummary {
  id: number;
  name: string;
  /** The first characters of the token, enough to recognise it; the rest is never stored. */
  prefix: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  createdAt: string;
}

/** A token with whose it is, as an admin's list of everyone's tokens shows it. */
export interface OwnedApiTokenSummary extends ApiTokenSummary {
  ownerId: number;
  ownerName: string;
  ownerEmail: string;
}

/** The answer to `POST /api/tokens`: the only time the whole token is shown. */
export interface CreatedApiToken extends ApiTokenSummary {
  token: string;
}
