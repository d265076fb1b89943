import type { Transaction } from 'sequelize';
import type { CutMarkValue, CutEvidence, ClipCutList, FrameCut } from '../../../shared/types/cuts';
import { recordAudit } from '../audit/audit';
import { badRequest, conflict, notFound } from '../errors';
import { Clip, CutMark, Frame, User } from '../models';
import { existingClip } from './clip-media';

/**
 * Cuts as the clip page explains them, and curators' marks. A mark overrides the detector before one frame: the
 * frame's `cutBefore` (what motion, flags and pairset builds read) follows the mark at once, the detector's own
 * decision stays in the frame's evidence, and removing the mark restores it. Pairsets built before keep their pairs;
 * the next build reads the corrected cuts. Every change writes an audit event.
 */

const detectedFrom = (evidence: CutEvidence | null) => evidence?.kind === 'hard' || evidence?.kind === 'gradual';

function frameCut(frame: Frame, mark: (CutMark & { markedBy?: User | null }) | null): FrameCut {
  return {
    index: frame.index,
    timeS: frame.timeS,
    detected: detectedFrom(frame.cutEvidence),
    cutBefore: frame.cutBefore,
    evidence: frame.cutEvidence,
    mark: mark && {
      value: mark.value,
      byUserId: mark.userId,
      byName: mark.markedBy?.name ?? null,
      at: mark.markedAt.toISOString(),
    },
  };
}

/** Frames with a cut (detected or marked), a mark, or evidence that fired, in index order. */
export async function listClipCuts(clipId: number): Promise<ClipCutList> {
  await existingClip(clipId);
  const frames = await Frame.findAll({
    where: { clipId },
    order: [['index', 'ASC']],
    attributes: ['index', 'timeS', 'cutBefore', 'cutEvidence'],
  });
  const marks = new Map(
    (await CutMark.findAll({ where: { clipId }, include: [{ model: User, as: 'markedBy' }] })).map((mark) => [
      mark.frameIndex,
      mark,
    ]),
  );
  const shown = frames.filter(
    (frame) =>
      frame.cutBefore ||
      marks.has(frame.index) ||
      detectedFrom(frame.cutEvidence) ||
      Object.keys(frame.cutEvidence?.fired ?? {}).length > 0,
  );
  return { items: shown.map((frame) => frameCut(frame, marks.get(frame.index) ?? null)) };
}

async function markableFrame(clipId: number, index: number, transaction: Transaction): Promise<Frame> {
  await existingClip(clipId);
  const frame = await Frame.findOne({ where: { clipId, index }, transaction });
  if (!frame) throw notFound(`Frame ${index} of clip ${clipId}`);
  if (index === 0) throw badRequest('first_frame', 'No cut can lie before the first frame of a clip.');
  if (frame.cutEvidence === null) {
    throw conflict(
      'cuts_not_measured',
      `Clip ${clipId} has not been through cut detection yet; mark cuts once its ` + 'signals are measured.',
    );
  }
  return frame;
}

/** Frames with a cut before them, counted as transitions (a run of them, a fade, is one). */
async function recountCuts(clipId: number, transaction: Transaction): Promise<void> {
  const cuts = (
    await Frame.findAll({ where: { clipId }, order: [['index', 'ASC']], attributes: ['cutBefore'], transaction })
  ).map((frame) => frame.cutBefore);
  const cutCount = cuts.filter((cut, k) => cut && !cuts[k - 1]).length;
  await Clip.update({ cutCount }, { where: { id: clipId }, transaction });
}

export async function markCut(clipId: number, index: number, value: CutMarkValue, actor: User): Promise<FrameCut> {
  return Clip.sequelize!.transaction(async (transaction) => {
    const frame = await markableFrame(clipId, index, transaction);
    const before = frame.cutBefore;
    const existing = await CutMark.findOne({ where: { clipId, frameIndex: index }, transaction });
    const fields = { value, userId: actor.id, markedAt: new Date() };
    const mark = existing
      ? await existing.update(fields, { transaction })
      : await CutMark.create({ clipId, frameIndex: index, ...fields }, { transaction });
    await frame.update({ cutBefore: value === 'cut' }, { transaction });
    await recountCuts(clipId, transaction);
    await recordAudit(
      {
        actorId: actor.id,
        action: 'clip.cut_mark',
        targetType: 'clip',
        targetId: clipId,
        detail: { frame: index, value, detected: detectedFrom(frame.cutEvidence), cutBefore: before },
      },
      transaction,
    );
    return frameCut(frame, Object.assign(mark, { markedBy: actor }));
  });
}

/** Removes a mark: the detector's decision counts again. */
export async function clearCutMark(clipId: number, index: number, actor: User): Promise<FrameCut> {
  return Clip.sequelize!.transaction(async (transaction) => {
    const frame = await markableFrame(clipId, index, transaction);
    const mark = await CutMark.findOne({ where: { clipId, frameIndex: index }, transaction });
    if (!mark) throw notFound(`A cut mark before frame ${index} of clip ${clipId}`);
    await mark.destroy({ transaction });
    const detected = detectedFrom(frame.cutEvidence);
    await frame.update({ cutBefore: detected }, { transaction });
    await recountCuts(clipId, transaction);
    await recordAudit(
      {
        actorId: actor.id,
        action: 'clip.cut_mark_clear',
        targetType: 'clip',
        targetId: clipId,
        detail: { frame: index, removed: mark.value, detected },
      },
      transaction,
    );
    return frameCut(frame, null);
  });
}
