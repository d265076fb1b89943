import { Op } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import { MAX_BULK_CLIPS } from '../../../shared/review/rules';
import type { BulkBody } from '../../../shared/schemas/review';
import type { BulkResponse, BulkResult } from '../../../shared/types/review';
import { AppError } from '../errors';
import { formatMailTime } from '../mail/templates/layout';
import { Clip, User, Verdict } from '../models';
import { recordAudit, recordAudits } from '../audit/audit';
import type { Viewer } from '../people/viewer';
import { hasLiveClaim, holdsLiveClaim } from './review-claims';
import { scheduleRejectionDigest } from './review-digest';
import { matchingClipIds } from './review-queue';
import { reasonByCode } from './review-reasons';
import { STATE_AFTER, verdictDetail } from './review-verdicts';

/**
 * One decision for many clips, chosen by id or by the queue's filter, in one transaction. Only clips awaiting
 * review are decided; a clip someone else holds a live claim on is skipped (even for an admin: that curator is
 * looking at it now), as is a decided one (its verdict is changed on its own screen). Every decided clip gets its
 * verdict (marked bulk), its audit event, and the end of any claim of the caller; the action itself is audited
 * once with what it did.
 */
export async function bulkDecide(body: BulkBody, viewer: Viewer, now = new Date()): Promise<BulkResponse> {
  return Clip.sequelize!.transaction(async (transaction) => {
    const ids = body.clipIds
      ? [...new Set(body.clipIds)]
      : await matchingClipIds(body.filter!, MAX_BULK_CLIPS + 1, transaction);
    if (ids.length > MAX_BULK_CLIPS) {
      throw new AppError(
        HttpStatus.UNPROCESSABLE_ENTITY,
        'too_many_clips',
        `More than ${MAX_BULK_CLIPS} clips match ` +
          `this filter; a bulk action decides at most ${MAX_BULK_CLIPS}. Narrow the filter and repeat.`,
      );
    }
    const reason = body.reason ? await reasonByCode(body.reason, transaction) : null;
    const clips = new Map(
      (
        await Clip.findAll({
          where: { id: { [Op.in]: ids } },
          include: [{ model: User, as: 'claimHolder', attributes: ['name'] }],
          transaction,
        })
      ).map((clip) => [clip.id, clip]),
    );

    const results: BulkResult[] = [];
    const decided: Clip[] = [];
    for (const id of ids) {
      const clip = clips.get(id);
      const skip = !clip ? 'no such clip' : skipReason(clip, viewer, now);
      if (skip) results.push({ clipId: id, outcome: 'skipped', message: skip });
      else {
        decided.push(clip!);
        results.push({ clipId: id, outcome: 'applied' });
      }
    }
    const decidedIds = decided.map((clip) => clip.id);
    const comment = body.comment ?? '';
    if (decided.length > 0) {
      // A clip awaiting review has no verdict in force; this keeps "one in force" true even if one lingered.
      await Verdict.update(
        { supersededAt: now },
        { where: { clipId: { [Op.in]: decidedIds }, supersededAt: null }, transaction },
      );
      await Verdict.bulkCreate(
        decided.map((clip) => ({
          clipId: clip.id,
          curatorId: viewer.id,
          decision: body.decision,
          reason: reason?.code ?? null,
          reasonLabel: reason?.label ?? null,
          comment,
          bulk: true,
          at: now,
        })),
        { transaction },
      );
      await Clip.update(
        { state: STATE_AFTER[body.decision], claimedBy: null, claimExpiresAt: null },
        { where: { id: { [Op.in]: decidedIds } }, transaction },
      );
      await recordAudits(
        decided.map((clip) => ({
          actorId: viewer.id,
          action: 'clip.verdict',
          targetType: 'clip',
          targetId: clip.id,
          detail: { ...verdictDetail(body.decision, reason, comment), bulk: true },
        })),
        transaction,
      );
      if (body.decision === 'reject') {
        for (const uploaderId of new Set(decided.map((clip) => clip.uploaderId))) {
          await scheduleRejectionDigest(uploaderId, transaction, now);
        }
      }
    }
    await recordAudit(
      {
        actorId: viewer.id,
        action: 'review.bulk',
        targetType: 'review',
        targetId: null,
        detail: {
          decision: body.decision,
          reason: reason?.code ?? null,
          comment,
          chosenBy: body.clipIds ? 'clipIds' : 'filter',
          filter: body.filter ?? null,
          applied: decidedIds,
          skipped: results.filter((result) => result.outcome === 'skipped').length,
        },
      },
      transaction,
    );
    return { results };
  });
}

function skipReason(clip: Clip, viewer: Viewer, now: Date): string | null {
  if (clip.state !== 'awaiting_review') {
    return `not awaiting review (${clip.state.replace('_', ' ')}); open the clip to change its verdict`;
  }
  if (hasLiveClaim(clip, now) && !holdsLiveClaim(clip, viewer.id, now)) {
    const holder = (clip.get('claimHolder') as User | null)?.name ?? 'someone else';
    return `claimed by ${holder} until ${formatMailTime(clip.claimExpiresAt!)}`;
  }
  return null;
}
