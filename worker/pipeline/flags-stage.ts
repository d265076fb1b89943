import type { ClipState } from '../../shared/clip-states';
import type { ClipFlagDetail } from '../../shared/types/clips';
import { Clip, Frame, MotionField } from '../../server/core/models';
import { recordAudit } from '../../server/core/audit/audit';
import { clipReviewSignals } from '../../shared/review/clip-signals';
import { clipFlags, type FlagFieldMotion, type FlagFrameSignals } from '../signals/flags';
import { hexToHash } from '../../shared/review/hash-bits';
import { bestNearDuplicate, type NearDuplicateMatch } from '../signals/perceptual-hash';
import type { PipelineStage } from './stage';

/**
 * flags: dark, overexposed, blurry, short, cut-heavy and duplicate from the signals, static and shaky from the
 * forward motion fields (flags.ts), with the project's thresholds. duplicate compares this clip's frame hashes with
 * those of the project's other clips. Then the clip awaits review; a clip that already has a verdict keeps it.
 */
export const flagsStage: PipelineStage = {
  name: 'flags',
  async run(context) {
    const { clip, settings } = context;
    const frames = await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] });
    const hashes = frames.map((frame) => hexToHash(measured(frame.dhash, frame.index)));
    const duplicate = await nearestDuplicate(
      clip.projectId,
      clip.id,
      hashes,
      settings.flagThresholds.duplicateHashDistance,
    );
    const motion = await forwardMotion(clip.id, frames.length);
    const raised = clipFlags(
      {
        durationS: clip.durationS,
        frames: frames.map(flagSignals),
        motion,
        duplicateShare: duplicate?.share ?? null,
      },
      settings.flagThresholds,
    );
    const flagDetails: ClipFlagDetail[] = raised.map((flag) =>
      flag.flag === 'duplicate' && duplicate ? { ...flag, matchClipId: duplicate.clipId } : { ...flag },
    );
    const flags = flagDetails.map((detail) => detail.flag);
    // What the review queue sorts by: mean motion, consistent share, usable pairs (shared/review/clip-signals.ts).
    const moments = frames.map((frame) => ({
      index: frame.index,
      cutBefore: frame.cutBefore,
      motion: motion[frame.index],
    }));
    const review = clipReviewSignals(moments, context.project.deltas);
    await context.commit(async (transaction) => {
      await Clip.update(
        {
          flags,
          flagDetails,
          ...review,
          state: stateAfterProcessing(clip.state),
          stage: null,
          error: null,
        },
        { where: { id: clip.id }, transaction },
      );
      await recordAudit(
        {
          actorId: null,
          action: 'clip.processed',
          targetType: 'clip',
          targetId: clip.id,
          detail: { frameCount: frames.length, cutCount: clip.cutCount, flags },
        },
        transaction,
      );
    });
  },
};

/** The project's other clip sharing the most near-duplicate frames with this one, read a batch of clips at a time. */
async function nearestDuplicate(projectId: number, clipId: number, hashes: bigint[], maxDistance: number) {
  let best: NearDuplicateMatch<number> | null = null;
  for await (const batch of Frame.hashBatchesOfOtherClips(projectId, clipId)) {
    const others = batch.map((other) => ({ clipId: other.clipId, hashes: other.hashes.map(hexToHash) }));
    const found = bestNearDuplicate(hashes, others, maxDistance);
    // Strictly better only, so among equal shares the earliest clip wins, as within one batch.
    if (found && (best === null || found.share > best.share)) best = found;
  }
  return best;
}

/** A verdict outlives reprocessing: only clips not yet reviewed go (back) to the review queue. */
export function stateAfterProcessing(state: ClipState): ClipState {
  return state === 'accepted' || state === 'rejected' ? state : 'awaiting_review';
}

/** motion[t]: the field t → t+1, null where a cut or the clip's end leaves none (the Motion stage ran before). */
type ForwardMotion = FlagFieldMotion & { consistentShare: number };

/** Per frame, the summary of the forward field from it (null where there is none): for flags and review signals. */
async function forwardMotion(clipId: number, frameCount: number): Promise<(ForwardMotion | null)[]> {
  const motion: (ForwardMotion | null)[] = Array.from({ length: frameCount }, () => null);
  for (const field of await MotionField.forwardOfClip(clipId)) {
    const { meanMagnitude, medianU, medianV, consistentShare } = field;
    if (field.fromIndex < frameCount) motion[field.fromIndex] = { meanMagnitude, medianU, medianV, consistentShare };
  }
  return motion;
}

function flagSignals(frame: Frame): FlagFrameSignals {
  return {
    meanLuma: measured(frame.meanLuma, frame.index),
    sharpness: measured(frame.sharpness, frame.index),
    clippedHighShare: measured(frame.clippedHighShare, frame.index),
    cutBefore: frame.cutBefore,
  };
}

/** The signals stage committed before this one, so a missing signal means the database was changed under us. */
function measured<T>(value: T | null, index: number): T {
  if (value === null) throw new Error(`frame ${index} has no signals; the signals stage must run first`);
  return value;
}
