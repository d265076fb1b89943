/** Diversity: clusterings of moments, similar clips and the cluster balance of a pairset. */

export const CLUSTERING_STATES = ['queued', 'running', 'done', 'failed'] as const;
export type ClusteringState = (typeof CLUSTERING_STATES)[number];

/** The mean silhouette of the k-means clustering with k clusters of a sample of the moments. */
export interface SilhouetteOfK {
  k: number;
  silhouette: number;
}

export interface ClusteringSummary {
  id: number;
  projectIds: number[];
  /** The engineer's k; null when the silhouette chose it. */
  requestedK: number | null;
  k: number | null;
  seed: number;
  restarts: number;
  state: ClusteringState;
  momentCount: number | null;
  inertia: number | null;
  /** Empty when k was given. */
  silhouettes: SilhouetteOfK[];
  /** Moments per cluster, by cluster number. */
  sizes: number[];
  error: string | null;
  createdAt: string;
  doneAt: string | null;
}

/** A frame standing for a cluster: the moment nearest its centre, or one of a clip. */
export interface MomentRef {
  clipId: number;
  frame: number;
}

export interface SimilarClip {
  clipId: number;
  originalName: string;
  site: string;
  state: string;
  cluster: number;
  /** Euclidean distance between the clips' mean descriptors, in standardised units. */
  distance: number;
}

export interface SimilarClips {
  /** Null when no finished clustering covers the clip's project or the clip was not in it. */
  clusteringId: number | null;
  cluster: number | null;
  items: SimilarClip[];
}

/** One cluster's moments in a pairset before and after balancing; cluster null gathers unclustered moments. */
export interface ClusterBalanceRow {
  cluster: number | null;
  before: number;
  after: number;
  samples: MomentRef[];
}

export interface ClusterBalance {
  clusteringId: number;
  /** The most moments any one cluster may give (after a share cap is resolved); null without a cap. */
  capMoments: number | null;
  momentsBefore: number;
  momentsAfter: number;
  largestShareBefore: number;
  largestShareAfter: number;
  clusters: ClusterBalanceRow[];
}
