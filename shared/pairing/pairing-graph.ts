/**
 * Views per moment, the pairing graph over them, and which moments of a clip can give each view pair.
 *
 * Graphs (Tian, Krishnan, Isola, "Contrastive Multiview Coding", 2019): `core` pairs one chosen core view with
 * every other view (n−1 pairs a moment, their "core view paradigm"); `full` pairs every two views
 * (n(n−1)/2 pairs a moment, their "full graph").
 *
 * Names: a view is `frame`, `neighbour+Δ` (the frame Δ sampled frames later), `luma`, `chroma` or `motion`
 * (the field t→t+1); a pair kind joins two views with `~`, e.g. `frame~neighbour+2`, `luma~chroma`,
 * `luma~motion`. Views are ordered frame, neighbours by Δ, luma, chroma, motion; a full-graph pair follows
 * that order and a core-graph pair puts the core view first.
 *
 * Moments: a pair is valid at frame t when every frame it reaches (t+Δ for a neighbour, t+1 for motion) exists
 * in the clip and no cut lies before any of t+1…t+reach. So no pair spans a cut or reaches past the clip's end.
 */

export type ViewKind = 'frame' | 'neighbour' | 'motion' | 'luma' | 'chroma';
export type NeighbourView = `neighbour+${number}`;
export type ViewName = 'frame' | NeighbourView | 'luma' | 'chroma' | 'motion';
export type PairKind = `${ViewName}~${ViewName}`;
export type PairingGraph = 'core' | 'full';

export interface ViewPair {
  kind: PairKind;
  a: ViewName;
  b: ViewName;
}

/** What the pairing needs to know of a sampled frame; motion is the field t→t+1 when one exists. */
export interface MomentFrame {
  index: number;
  cutBefore: boolean;
  motion?: { meanMagnitude: number; consistentShare: number } | null;
}

/**
 * Pair filters of a pairset definition. They judge the moment by its field t→t+1 and apply to every pair of
 * that moment; when a filter is set, a moment without a field is left out.
 */
export interface MomentFilter {
  minMeanMotion?: number;
  minConsistentShare?: number;
}

export interface PairCount extends ViewPair {
  count: number;
}

const DEFAULT_CORE_VIEW: ViewName = 'frame';
const NEIGHBOUR_PREFIX = 'neighbour+';
const MOTION_REACH = 1;

/** The views of one moment in canonical order; `neighbour` expands to one view per Δ (deduplicated, ascending). */
export function viewNames(views: readonly ViewKind[], deltas: readonly number[]): ViewName[] {
  const chosen = new Set(views);
  const names: ViewName[] = [];
  if (chosen.has('frame')) names.push('frame');
  if (chosen.has('neighbour')) {
    const sorted = [...new Set(deltas)].sort((x, y) => x - y);
    if (sorted.length === 0) throw new RangeError('the neighbour view needs at least one Δ');
    for (const delta of sorted) {
      if (!Number.isInteger(delta) || delta < 1) throw new RangeError(`Δ must be a positive integer, got ${delta}`);
      names.push(`${NEIGHBOUR_PREFIX}${delta}`);
    }
  }
  for (const kind of ['luma', 'chroma', 'motion'] as const) {
    if (chosen.has(kind)) names.push(kind);
  }
  return names;
}

/** The view pairs of one moment under a graph; the core view defaults to `frame`, else the first view. */
export function pairKinds(views: readonly ViewName[], graph: PairingGraph, coreView?: ViewName): ViewPair[] {
  if (graph === 'full') {
    const pairs: ViewPair[] = [];
    views.forEach((a, i) => views.slice(i + 1).forEach((b) => pairs.push(viewPair(a, b))));
    return pairs;
  }
  if (views.length === 0) return [];
  const core = coreView ?? (views.includes(DEFAULT_CORE_VIEW) ? DEFAULT_CORE_VIEW : views[0]);
  if (!views.includes(core)) throw new RangeError(`core view ${core} is not among the chosen views`);
  return views.filter((v) => v !== core).map((other) => viewPair(core, other));
}

/** How many sampled frames past the moment a view reaches. */
export function viewReach(view: ViewName): number {
  if (view === 'motion') return MOTION_REACH;
  if (view.startsWith(NEIGHBOUR_PREFIX)) return Number(view.slice(NEIGHBOUR_PREFIX.length));
  return 0;
}

/** Frame indices of a clip at which the pair is valid and passes the filter, ascending. */
export function validMoments(frames: readonly MomentFrame[], pair: ViewPair, filter: MomentFilter = {}): number[] {
  const sorted = [...frames].sort((x, y) => x.index - y.index);
  const reach = Math.max(viewReach(pair.a), viewReach(pair.b));
  const ahead = framesAheadWithoutCut(sorted);
  const moments: number[] = [];
  sorted.forEach((frame, i) => {
    if (ahead[i] >= reach && passes(frame, filter)) moments.push(frame.index);
  });
  return moments;
}

/** Valid moments per pair kind, summed over clips. */
export function countPairs(
  clips: readonly (readonly MomentFrame[])[],
  pairs: readonly ViewPair[],
  filter: MomentFilter = {},
): PairCount[] {
  return pairs.map((pair) => ({
    ...pair,
    count: clips.reduce((sum, frames) => sum + validMoments(frames, pair, filter).length, 0),
  }));
}

function viewPair(a: ViewName, b: ViewName): ViewPair {
  return { kind: `${a}~${b}`, a, b };
}

/** For each frame (sorted), how many following frames are consecutive indices with no cut before them. */
function framesAheadWithoutCut(sorted: readonly MomentFrame[]): Int32Array {
  const ahead = new Int32Array(sorted.length);
  for (let i = sorted.length - 2; i >= 0; i -= 1) {
    const next = sorted[i + 1];
    const joined = next.index === sorted[i].index + 1 && !next.cutBefore;
    ahead[i] = joined ? ahead[i + 1] + 1 : 0;
  }
  return ahead;
}

function passes(frame: MomentFrame, filter: MomentFilter): boolean {
  const { minMeanMotion, minConsistentShare } = filter;
  if (minMeanMotion === undefined && minConsistentShare === undefined) return true;
  const motion = frame.motion;
  if (!motion) return false;
  return (
    (minMeanMotion === undefined || motion.meanMagnitude >= minMeanMotion) &&
    (minConsistentShare === undefined || motion.consistentShare >= minConsistentShare)
  );
}
