import { balancePlan, mixClusters, type ClusterOf } from '../../../shared/diversity/cluster-balance';
import { planPairs, type PlannedPair } from '../../../shared/pairing/pair-plan';
import type { ViewPair } from '../../../shared/pairing/pairing-graph';
import type { PairsetPreviewBody } from '../../../shared/schemas/pairsets';
import type { ClusterBalance } from '../../../shared/types/diversity';
import { clusterLookup } from '../diversity/clusterings';
import type { SourceClip } from './pairset-sources';

export interface DefinitionPlan {
  planned: PlannedPair[];
  /** Null without diversity options. */
  balance: ClusterBalance | null;
  /** The stored cluster of each moment, for pair.json; null without diversity options. */
  clusters: { clusteringId: number; clusterOf: ClusterOf } | null;
}

/**
 * The pairs a definition gives, as the form's preview and the build both take them: the plan (pair-plan.ts), then,
 * with diversity options, each cluster capped (cluster-balance.ts, seeded with the split seed) and, if asked, the
 * order mixed across clusters. Cluster labels are those the clustering stored, so a preview never clusters.
 */
export async function planDefinition(
  definition: Pick<PairsetPreviewBody, 'split' | 'diversity' | 'minMeanMotion' | 'minConsistentShare'>,
  sources: readonly SourceClip[],
  pairs: readonly ViewPair[],
): Promise<DefinitionPlan> {
  const planned = planPairs(sources, pairs, definition.split, definition);
  const options = definition.diversity;
  if (!options) return { planned, balance: null, clusters: null };
  const { clusterOf } = await clusterLookup(
    options.clusteringId,
    sources.map((clip) => clip.id),
  );
  const balanced = balancePlan(planned, clusterOf, options, definition.split.seed);
  const largest = (key: 'before' | 'after', total: number) =>
    total === 0 ? 0 : Math.max(...balanced.rows.map((row) => row[key])) / total;
  return {
    planned: options.mixClusters ? mixClusters(balanced.planned, clusterOf) : balanced.planned,
    balance: {
      clusteringId: options.clusteringId,
      capMoments: balanced.capMoments,
      momentsBefore: balanced.momentsBefore,
      momentsAfter: balanced.momentsAfter,
      largestShareBefore: largest('before', balanced.momentsBefore),
      largestShareAfter: largest('after', balanced.momentsAfter),
      clusters: balanced.rows,
    },
    clusters: { clusteringId: options.clusteringId, clusterOf },
  };
}
