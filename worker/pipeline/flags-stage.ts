import type { ClipState } from '../../shared/clip-states';
import type { ClipFlagDetail } from '../../shared/types/clips';
import { Clip, Frame } from '../../server/models';
import { recordAudit } from '../../server/services/audit';
import { clipFlags, type FlagFrameSignals } from '../signals/flags';
import { bestNearDuplicate, hexToHash } from '../signals/perceptual-hash';
import type { PipelineStage } from './stage';

/**
 * flags: dark, overexposed, blurry, short, cut-heavy and duplicate from the signals (flags.ts), with the project's
 * thresholds. duplicate compares this clip's frame hashes with those of the project's other clips. static and
 * shaky need motion fields and are raised once the Motion stage supplies them (motion is null until then).
 * Then the clip awaits review; a clip that already has a verdict keeps it.
 */
export const flagsStage: PipelineStage = {
  name: 'flags',
  async run(context) {
    const { clip, settings } = context;
    const frames = await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] });
    const hashes = frames.map((frame) => hexToHash(measured(frame.dhash, frame.index)));
    const others = await Frame.hashesOfOtherClips(clip.projectId, clip.id);
    const duplicate = bestNearDuplicate(hashes, others.map((other) => ({
      clipId: other.clipId, hashes: other.hashes.map(hexToHash),
    })), settings.flagThresholds.duplicateHashDistance);
    const raised = clipFlags({
      durationS: clip.durationS,
      frames: frames.map(flagSignals),
      motion: null,
      duplicateShare: duplicate?.share ?? null,
    }, settings.flagThresholds);
    const flagDetails: ClipFlagDetail[] = raised.map((flag) => (flag.flag === 'duplicate' && duplicate
      ? { ...flag, matchClipId: duplicate.clipId }
      : { ...flag }));
    const flags = flagDetails.map((detail) => detail.flag);
    await context.commit(async (transaction) => {
      await Clip.update({ flags, flagDetails, state: stateAfterProcessing(clip.state), stage: null, error: null },
        { where: { id: clip.id }, transaction });
      await recordAudit({
        actorId: null, action: 'clip.processed', targetType: 'clip', targetId: clip.id,
        detail: { frameCount: frames.length, cutCount: clip.cutCount, flags },
      }, transaction);
    });
  },
};

/** A verdict outlives reprocessing: only clips not yet reviewed go (back) to the review queue. */
export function stateAfterProcessing(state: ClipState): ClipState {
  return state === 'accepted' || state === 'rejected' ? state : 'awaiting_review';
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
