/**
 * Where the cuts of a clip are, from the evidence of each neighbour pair (cut-evidence.ts, cuts.ts), with
 * thresholds that adapt to the clip: a measure fires when it stands out from the same measure over a window of
 * neighbouring pairs (the sliding-window rule of shot-boundary detection: B.-L. Yeo and B. Liu, "Rapid scene
 * analysis on compressed video", IEEE TCSVT 1995, take a cut where the difference is the window's largest and
 * several times the others; our level is the window's median, our factors Kinefold's own, common practice).
 *
 * - hard cut before frame k: the motion cannot explain pair (k−1, k) — its warp error stands out — and either the
 *   warp error is large in itself or another measure fired too (histogram, edges or consistency);
 * - gradual transition (fade, dissolve): a run of two or more pairs whose warp error and histogram distance both
 *   stand out, and whose first and last frames differ as two shots do (the twin-comparison idea of H. J. Zhang,
 *   A. Kankanhalli, S. W. Smoliar, "Automatic partitioning of full-motion video", Multimedia Systems 1993: compare
 *   the accumulated change across the run). Each frame of the run gets a cut before it, so no pair spans it;
 * - flash: hard cuts before frames k and k+1 whose outer frames k−1 and k+1 the motion explains: no cut.
 */
import type { CutEvidence, CutEvidenceName, CutKind } from '../../shared/types/cuts';
import type { PairEvidence } from './cut-evidence';

/** Pairs on each side of a pair that set its local level. */
export const LOCAL_WINDOW = 6;
/** A measure stands out when it is this many times its local level (and above its floor). */
const STAND_OUT = 3;
/**
 * The warp error stands out at a smaller factor: within handheld footage its level is about 0.2–0.3, and a cut
 * there measured 0.78–0.98 (the generated set).
 */
const WARP_STAND_OUT = 2.5;
/** Edges vary less between pairs of one shot; they stand out at a smaller factor. */
const EDGE_STAND_OUT = 1.4;
/** Warp error from which motion may be said to fail: half that of unrelated pictures. */
const WARP_FLOOR = 0.45;
/** Warp error that alone makes a cut once it stands out: about two thirds of that of unrelated pictures. */
const WARP_STRONG = 0.6;
/** Histogram distance from which a change of tones counts when it stands out (well below the 0.2 default). */
const HISTOGRAM_FLOOR = 0.02;
/** Edge change ratio from which lost and new edges count. */
const EDGE_FLOOR = 0.15;
/** Consistent share at or below which the coarse field is judged to have collapsed. */
const CONSISTENCY_COLLAPSE = 0.5;
/** Warp error from which a pair may belong to a gradual transition. */
const GRADUAL_WARP_FLOOR = 0.25;

/** The measures of one pair: the coarse motion and edges, and the histogram distance. */
export interface PairMeasures extends Omit<PairEvidence, 'shift'> {
  histogramDistance: number;
}

export interface CutDecision {
  /** One entry per frame; the first frame never has a cut before it. */
  cutBefore: boolean[];
  /** One entry per frame: the evidence of the pair ending at it; null for the first frame. */
  evidence: (CutEvidence | null)[];
}

export interface CutDecisionOptions {
  /** The project's histogram threshold (cutThreshold): a histogram distance this large fires whatever the window. */
  histogramThreshold: number;
}

/** The median of `values` without the entries at `skip`; 0 when nothing is left. */
function medianWithout(values: readonly number[], from: number, to: number, skip: (i: number) => boolean): number {
  const kept: number[] = [];
  for (let i = Math.max(0, from); i <= Math.min(values.length - 1, to); i += 1) if (!skip(i)) kept.push(values[i]!);
  if (kept.length === 0) return 0;
  kept.sort((a, b) => a - b);
  const mid = kept.length >> 1;
  return kept.length % 2 ? kept[mid]! : (kept[mid - 1]! + kept[mid]!) / 2;
}

/** The local level of measure `values` around pair p (the pair itself left out). */
function localLevel(values: readonly number[], p: number): number {
  return medianWithout(values, p - LOCAL_WINDOW, p + LOCAL_WINDOW, (i) => i === p);
}

/** Which measures fire for one pair, with the threshold each crossed. */
function firedMeasures(
  pair: PairMeasures,
  level: Pick<PairMeasures, 'warpError' | 'histogramDistance' | 'edgeChange'>,
  histogramThreshold: number,
): Partial<Record<CutEvidenceName, number>> {
  const fired: Partial<Record<CutEvidenceName, number>> = {};
  const warpAt = Math.max(WARP_FLOOR, WARP_STAND_OUT * level.warpError);
  if (pair.warpError >= warpAt) fired.warp = warpAt;
  const histogramAt = Math.min(histogramThreshold, Math.max(HISTOGRAM_FLOOR, STAND_OUT * level.histogramDistance));
  if (pair.histogramDistance >= histogramAt) fired.histogram = histogramAt;
  const edgesAt = Math.max(EDGE_FLOOR, EDGE_STAND_OUT * level.edgeChange);
  if (pair.edgeChange >= edgesAt) fired.edges = edgesAt;
  if (pair.motionConsistency !== null && pair.motionConsistency <= CONSISTENCY_COLLAPSE) {
    fired.consistency = CONSISTENCY_COLLAPSE;
  }
  return fired;
}

/** A hard cut: the motion fails, and strongly so or with another measure beside it. */
function isHardCut(pair: PairMeasures, fired: Partial<Record<CutEvidenceName, number>>): boolean {
  if (fired.warp === undefined) return false;
  return (
    pair.warpError >= WARP_STRONG ||
    fired.histogram !== undefined ||
    fired.edges !== undefined ||
    fired.consistency !== undefined
  );
}

/** Two frames far apart are two shots when the motion cannot explain them and their tones or edges differ too. */
function differentShots(measures: PairMeasures): boolean {
  return (
    measures.warpError >= WARP_STRONG ||
    (measures.warpError >= WARP_FLOOR &&
      (measures.histogramDistance >= HISTOGRAM_FLOOR ||
        measures.edgeChange >= EDGE_FLOOR ||
        (measures.motionConsistency !== null && measures.motionConsistency <= CONSISTENCY_COLLAPSE)))
  );
}

/**
 * Decides the cuts of a clip. `pairs[p]` holds the measures between frames p and p+1; `compare(a, b)` measures any
 * two frames of the clip, for the checks across a gradual transition or a flash.
 */
export function decideCuts(
  pairs: readonly PairMeasures[],
  compare: (a: number, b: number) => PairMeasures,
  { histogramThreshold }: CutDecisionOptions,
): CutDecision {
  const frames = pairs.length + 1;
  const warp = pairs.map((pair) => pair.warpError);
  const histogram = pairs.map((pair) => pair.histogramDistance);
  const edges = pairs.map((pair) => pair.edgeChange);
  const levels = pairs.map((_, p) => ({
    warpError: localLevel(warp, p),
    histogramDistance: localLevel(histogram, p),
    edgeChange: localLevel(edges, p),
  }));
  const fired = pairs.map((pair, p) => firedMeasures(pair, levels[p]!, histogramThreshold));
  const kinds: (CutKind | null)[] = pairs.map(() => null);

  // Gradual transitions first: runs of pairs whose warp error and tones both stand out.
  const inRun = pairs.map(
    (pair, p) =>
      pair.warpError >= Math.max(GRADUAL_WARP_FLOOR, WARP_STAND_OUT * levels[p]!.warpError) &&
      fired[p]!.histogram !== undefined,
  );
  for (let p = 0; p < pairs.length;) {
    if (!inRun[p]) {
      p += 1;
      continue;
    }
    let end = p;
    while (end + 1 < pairs.length && inRun[end + 1]) end += 1;
    if (end > p && differentShots(compare(p, end + 1))) for (let q = p; q <= end; q += 1) kinds[q] = 'gradual';
    p = end + 1;
  }

  for (let p = 0; p < pairs.length; p += 1) {
    if (kinds[p] === null && isHardCut(pairs[p]!, fired[p]!)) kinds[p] = 'hard';
  }
  // A flash: two hard cuts in a row around one frame whose neighbours are one shot.
  for (let p = 0; p + 1 < pairs.length; p += 1) {
    if (kinds[p] === 'hard' && kinds[p + 1] === 'hard' && !differentShots(compare(p, p + 2))) {
      kinds[p] = 'flash';
      kinds[p + 1] = 'flash';
      p += 1;
    }
  }

  const cutBefore = Array.from(
    { length: frames },
    (_, k) => k > 0 && (kinds[k - 1] === 'hard' || kinds[k - 1] === 'gradual'),
  );
  const evidence: (CutEvidence | null)[] = [
    null,
    ...pairs.map((pair, p) => ({
      histogramDistance: pair.histogramDistance,
      edgeChange: pair.edgeChange,
      motionConsistency: pair.motionConsistency,
      warpError: pair.warpError,
      localWarpError: levels[p]!.warpError,
      fired: fired[p]!,
      kind: kinds[p]!,
    })),
  ];
  return { cutBefore, evidence };
}
