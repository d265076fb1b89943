import { HttpStatus } from '../../../shared/http-status';
import { CLAIM_MINUTES, UNDO_SECONDS } from '../../../shared/review/rules';
import type { UndoVerdictBody } from '../../../shared/schemas/review-flow';
import type { ClipDetail } from '../../../shared/types/clips';
import { AppError, conflict, notFound } from '../errors';
import { Clip, Verdict } from '../models';
import { recordAudit } from '../audit/audit';
import { getClipDetail } from '../clips/clips';
import type { Viewer } from '../people/viewer';
import { claimedByOther, hasLiveClaim, holdsLiveClaim } from './review-claims';

/**
 * Undoes a verdict given moments ago: the clip goes back to the queue, claimed by the person undoing it so they
 * can decide again at once. Only the verdict in force, named by id, within UNDO_SECONDS of being given, by its
 * curator (or an admin), and only a first verdict: one that replaced another is changed again instead, so undo
 * never has to bring an older verdict back. The verdict row stays, superseded, and a rejection it carried drops
 * out of the uploader's digest as a changed one does. Verdict, clip and audit event commit together.
 */
export async function undoVerdict(
  clipId: number,
  body: UndoVerdictBody,
  viewer: Viewer,
  now = new Date(),
): Promise<ClipDetail> {
  await Clip.sequelize!.transaction(async (transaction) => {
    const clip = await Clip.findByPk(clipId, { transaction });
    if (!clip) throw notFound(`Clip ${clipId}`);
    const verdict = await Verdict.findOne({ where: { clipId, supersededAt: null }, transaction });
    if (!verdict || verdict.id !== body.verdictId) {
      throw conflict(
        'verdict_changed',
        `Verdict ${body.verdictId} is no longer the one in force on clip ${clipId}; ` + 'nothing was undone.',
      );
    }
    if (verdict.curatorId !== viewer.id && viewer.role !== 'admin') {
      throw new AppError(
        HttpStatus.FORBIDDEN,
        'not_your_verdict',
        `Only the curator who gave verdict ${verdict.id}, or an admin, can undo it.`,
      );
    }
    if (now.getTime() - verdict.at.getTime() > UNDO_SECONDS * 1000) {
      throw conflict(
        'undo_window_closed',
        `A verdict can be undone for ${UNDO_SECONDS} seconds; change clip ` + `${clipId}'s verdict instead.`,
      );
    }
    // A change supersedes the verdict before it at the very moment the new one is given (review-verdicts.ts).
    if (await Verdict.findOne({ where: { clipId, supersededAt: verdict.at }, attributes: ['id'], transaction })) {
      throw conflict(
        'not_first_verdict',
        `Verdict ${verdict.id} replaced an earlier one on clip ${clipId}; change ` + 'it again instead of undoing it.',
      );
    }
    if (hasLiveClaim(clip, now) && !holdsLiveClaim(clip, viewer.id, now)) throw await claimedByOther(clip, transaction);
    await verdict.update({ supersededAt: now }, { transaction });
    await clip.update(
      {
        state: 'awaiting_review',
        claimedBy: viewer.id,
        claimExpiresAt: new Date(now.getTime() + CLAIM_MINUTES * 60_000),
      },
      { transaction },
    );
    const words = verdict.decision === 'accept' ? 'accepted' : `rejected: ${verdict.reasonLabel ?? 'no reason'}`;
    await recordAudit(
      {
        actorId: viewer.id,
        action: 'clip.verdict_undo',
        targetType: 'clip',
        targetId: clipId,
        detail: {
          verdictId: verdict.id,
          decision: verdict.decision,
          reason: verdict.reason,
          message: `undid the verdict (${words}); the clip is back in the queue`,
        },
      },
      transaction,
    );
  });
  return getClipDetail(clipId, viewer);
}
