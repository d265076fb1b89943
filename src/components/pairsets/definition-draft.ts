import type { ViewKind } from '../../../shared/pairing/pairing-graph';
import { PAIRSET_DEFAULTS, type MotionFormat, type PairsetPreviewBody } from '../../../shared/schemas/pairsets';

/** What the definition form edits: text fields as typed, numbers that may be left empty. */
export interface DefinitionDraft {
  name: string;
  projectIds: number[];
  /** Comma-separated, as typed. */
  sites: string;
  tags: string;
  captured: Date[] | null;
  views: ViewKind[];
  deltas: string;
  graph: 'core' | 'full';
  coreView: string | null;
  minMeanMotion: number | null;
  minConsistentShare: number | null;
  outputSize: number | null;
  motionFormat: MotionFormat;
  /** Share of clips in val, in percent. */
  valPercent: number;
  seed: number;
  shardMB: number;
  temperature: number;
  /** Diversity: the clustering to balance by (null: none), a cap on each cluster's moments, a mixed order. */
  clusteringId: number | null;
  capKind: 'none' | 'moments' | 'share';
  /** Moments, or a share in percent. */
  capValue: number | null;
  mixClusters: boolean;
}

const END_OF_DAY_MS = 86_399_999;

export function emptyDraft(): DefinitionDraft {
  return {
    name: '',
    projectIds: [],
    sites: '',
    tags: '',
    captured: null,
    views: ['frame', 'neighbour', 'motion'],
    deltas: '1, 2',
    graph: 'core',
    coreView: null,
    minMeanMotion: null,
    minConsistentShare: null,
    outputSize: null,
    motionFormat: PAIRSET_DEFAULTS.motionFormat,
    valPercent: 10,
    seed: 1,
    shardMB: PAIRSET_DEFAULTS.shardMB,
    temperature: PAIRSET_DEFAULTS.temperature,
    clusteringId: null,
    capKind: 'none',
    capValue: null,
    mixClusters: false,
  };
}

const list = (text: string) =>
  text
    .split(',')
    .map((item) => item.trim())
    .filter(Boolean);

/** The API body of a draft; fields left empty are left out, so the server's defaults and checks apply. */
export function definitionBody(draft: DefinitionDraft): PairsetPreviewBody {
  const [from, to] = draft.captured ?? [];
  const neighbour = draft.views.includes('neighbour');
  const body: PairsetPreviewBody = {
    name: draft.name.trim() || undefined,
    projectIds: draft.projectIds,
    views: draft.views,
    deltas: neighbour ? list(draft.deltas).map(Number) : [],
    graph: draft.graph,
    motionFormat: draft.motionFormat,
    split: { val: draft.valPercent / 100, seed: draft.seed },
    shardMB: draft.shardMB,
    temperature: draft.temperature,
  };
  if (list(draft.sites).length) body.sites = list(draft.sites);
  if (list(draft.tags).length) body.tags = list(draft.tags);
  if (from) body.capturedFrom = from.toISOString();
  if (to) body.capturedTo = new Date(to.getTime() + END_OF_DAY_MS).toISOString();
  if (draft.graph === 'core' && draft.coreView) body.coreView = draft.coreView;
  if (draft.minMeanMotion !== null) body.minMeanMotion = draft.minMeanMotion;
  if (draft.minConsistentShare !== null) body.minConsistentShare = draft.minConsistentShare;
  if (draft.outputSize !== null) body.outputSize = draft.outputSize;
  if (draft.clusteringId !== null) {
    body.diversity = { clusteringId: draft.clusteringId, mixClusters: draft.mixClusters };
    if (draft.capKind === 'moments' && draft.capValue !== null) body.diversity.capMoments = draft.capValue;
    if (draft.capKind === 'share' && draft.capValue !== null) body.diversity.capShare = draft.capValue / 100;
  }
  return body;
}
