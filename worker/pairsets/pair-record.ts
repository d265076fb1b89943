import type { PlannedPair } from '../../shared/pairing/pair-plan';
import { viewReach, type ViewName } from '../../shared/pairing/pairing-graph';
import type { MotionFormat } from '../../shared/schemas/pairsets';
import type { SourceClip, SourceFrame } from '../../server/core/pairsets/pairset-sources';
import { viewExtension, viewFrame } from './pair-members';

const ID_DIGITS = 6;

/**
 * `<clip>-<moment>-<view pair>`, e.g. `000012-000034-frame~neighbour+2`: unique in a pairset, and with ids padded
 * the keys of one view pair sort in shard order.
 */
export function pairKey({ clipId, moment, pair }: PlannedPair): string {
  return `${pad(clipId)}-${pad(moment)}-${pair.kind}`;
}

export function pairFolder(planned: PlannedPair): string {
  return `pairs/${pairKey(planned)}`;
}

/** The two member names of a pair: `a.<ext>` and `b.<ext>`. */
export function memberNames(planned: PlannedPair, motionFormat: MotionFormat): { a: string; b: string } {
  return {
    a: `a.${viewExtension(planned.pair.a, motionFormat)}`,
    b: `b.${viewExtension(planned.pair.b, motionFormat)}`,
  };
}

/**
 * pair.json: the clip, the moment, both views with their frame and Δ, the estimator and the moment's signals; with
 * a clustering in the definition, the moment's cluster (`id` null: the clustering did not see the moment), so a
 * trainer can sample by cluster.
 */
export function pairRecord(
  planned: PlannedPair,
  clip: SourceClip,
  frame: SourceFrame,
  motionFormat: MotionFormat,
  cluster?: { clustering: number; id: number | null },
) {
  const names = memberNames(planned, motionFormat);
  const usesMotion = planned.pair.a === 'motion' || planned.pair.b === 'motion';
  return {
    key: pairKey(planned),
    kind: planned.pair.kind,
    split: planned.split,
    clip: { id: clip.id, projectId: clip.projectId, site: clip.site },
    moment: { frame: planned.moment, timeS: frame.timeS },
    a: viewRecord(planned.pair.a, planned.moment, names.a),
    b: viewRecord(planned.pair.b, planned.moment, names.b),
    estimator: usesMotion ? (frame.motion?.estimator ?? null) : null,
    signals: {
      meanLuma: frame.meanLuma,
      contrast: frame.contrast,
      sharpness: frame.sharpness,
      clippedShare: frame.clippedShare,
      motion: frame.motion
        ? {
            meanMagnitude: frame.motion.meanMagnitude,
            p95Magnitude: frame.motion.p95Magnitude,
            consistentShare: frame.motion.consistentShare,
          }
        : null,
    },
    ...(cluster ? { cluster } : {}),
  };
}

function viewRecord(view: ViewName, moment: number, file: string) {
  const base = view.startsWith('neighbour+') ? 'neighbour' : view;
  return {
    view,
    kind: base,
    file,
    frame: viewFrame(view, moment),
    delta: base === 'neighbour' ? viewReach(view) : null,
    // The motion view is the field from its frame to the next one.
    toFrame: view === 'motion' ? moment + 1 : null,
  };
}

function pad(value: number): string {
  return String(value).padStart(ID_DIGITS, '0');
}
