import { countPlanned, type PlannedPair } from '../../../shared/pairing/pair-plan';
import type { ViewPair } from '../../../shared/pairing/pairing-graph';
import type { SplitName } from '../../../shared/pairing/split';
import type {
  Histogram,
  PairKindCount,
  PairsetPreview,
  PairsetStatistics,
  SplitCounts,
} from '../../../shared/types/pairsets';
import type { SourceClip } from './pairset-sources';

/** Bins of the motion and sharpness histograms: equal widths between the smallest and largest value. */
export const HISTOGRAM_BINS = 20;
const SECONDS_PER_HOUR = 3600;

type PlanCounts = Omit<PairsetPreview, 'views'>;

/**
 * Counts of a plan: pairs per view pair and split, and the clips (those giving at least one pair) with their
 * footage hours per split. The definition form shows these live; the built pairset's statistics start from them.
 */
export function planCounts(
  planned: readonly PlannedPair[],
  pairs: readonly ViewPair[],
  sources: readonly SourceClip[],
): PlanCounts {
  const kinds: PairKindCount[] = countPlanned(planned, pairs).map(({ pair, train, val, total }) => ({
    kind: pair.kind,
    a: pair.a,
    b: pair.b,
    train,
    val,
    total,
  }));
  const durations = new Map(sources.map((clip) => [clip.id, clip.durationS]));
  const clipSplit = new Map<number, SplitName>(planned.map((item) => [item.clipId, item.split]));
  const clips = emptyCounts();
  const footageHours = emptyCounts();
  for (const [clipId, split] of clipSplit) {
    add(clips, split, 1);
    add(footageHours, split, (durations.get(clipId) ?? 0) / SECONDS_PER_HOUR);
  }
  const pairCounts = emptyCounts();
  for (const item of planned) add(pairCounts, item.split, 1);
  return { kinds, clips, pairs: pairCounts, footageHours };
}

/** What a built pairset holds: the plan's counts, pairs and clips per site and project, and histograms. */
export function pairsetStatistics(
  planned: readonly PlannedPair[],
  pairs: readonly ViewPair[],
  sources: readonly SourceClip[],
): PairsetStatistics {
  const clipsById = new Map(sources.map((clip) => [clip.id, clip]));
  const frames = new Map(sources.flatMap((clip) => clip.frames.map((frame) => [`${clip.id}:${frame.index}`, frame])));
  const bySite = new Map<string, { site: string; clips: Set<number>; pairs: number }>();
  const byProject = new Map<number, { projectId: number; projectName: string; clips: Set<number>; pairs: number }>();
  const moments = new Set<string>();
  const motion: number[] = [];
  const sharpness: number[] = [];
  let motionMissing = 0;
  let sharpnessMissing = 0;
  for (const item of planned) {
    const clip = clipsById.get(item.clipId)!;
    const site = bySite.get(clip.site) ?? { site: clip.site, clips: new Set<number>(), pairs: 0 };
    site.clips.add(clip.id);
    site.pairs += 1;
    bySite.set(clip.site, site);
    const project = byProject.get(clip.projectId) ?? {
      projectId: clip.projectId,
      projectName: clip.projectName,
      clips: new Set<number>(),
      pairs: 0,
    };
    project.clips.add(clip.id);
    project.pairs += 1;
    byProject.set(clip.projectId, project);
    const key = `${item.clipId}:${item.moment}`;
    if (moments.has(key)) continue;
    moments.add(key);
    const frame = frames.get(key);
    if (frame?.motion) motion.push(frame.motion.meanMagnitude);
    else motionMissing += 1;
    if (frame?.sharpness !== null && frame?.sharpness !== undefined) sharpness.push(frame.sharpness);
    else sharpnessMissing += 1;
  }
  const byPairs = (x: { pairs: number }, y: { pairs: number }) => y.pairs - x.pairs;
  return {
    ...planCounts(planned, pairs, sources),
    moments: moments.size,
    bySite: [...bySite.values()]
      .sort((x, y) => byPairs(x, y) || x.site.localeCompare(y.site))
      .map(({ site, clips, pairs: count }) => ({ site, clips: clips.size, pairs: count })),
    byProject: [...byProject.values()]
      .sort((x, y) => byPairs(x, y) || x.projectId - y.projectId)
      .map(({ projectId, projectName, clips, pairs: count }) => ({
        projectId,
        projectName,
        clips: clips.size,
        pairs: count,
      })),
    motionMagnitude: histogram(motion, motionMissing),
    sharpness: histogram(sharpness, sharpnessMissing),
  };
}

/** Equal-width bins from the smallest to the largest value; the largest value falls in the last bin. */
export function histogram(values: readonly number[], missing = 0, bins = HISTOGRAM_BINS): Histogram {
  if (values.length === 0) return { edges: [], counts: [], missing };
  let min = Infinity;
  let max = -Infinity;
  for (const value of values) {
    if (value < min) min = value;
    if (value > max) max = value;
  }
  if (min === max) return { edges: [min, max], counts: [values.length], missing };
  const width = (max - min) / bins;
  const counts = new Array<number>(bins).fill(0);
  for (const value of values) counts[Math.min(bins - 1, Math.floor((value - min) / width))] += 1;
  const edges = Array.from({ length: bins + 1 }, (_, i) => (i === bins ? max : min + i * width));
  return { edges, counts, missing };
}

function emptyCounts(): SplitCounts {
  return { train: 0, val: 0, total: 0 };
}

function add(counts: SplitCounts, split: SplitName, amount: number): void {
  counts[split] += amount;
  counts.total += amount;
}
