import type { Transaction } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import type { RejectReason } from '../../../shared/review/reject-reasons';
import { VERDICT_CHANGE_HOURS, type VerdictDecision } from '../../../shared/review/rules';
import type { VerdictBody } from '../../../shared/schemas/review';
import type { ClipDetail } from '../../../shared/types/clips';
import { AppError, conflict, notFound } from '../errors';
import { formatMailTime } from '../mail/templates/layout';
import { Clip, User, Verdict } from '../models';
import { recordAudit } from '../audit/audit';
import { getClipDetail } from '../clips/clips';
import type { Viewer } from '../people/viewer';
import { claimedByOther, hasLiveClaim, holdsLiveClaim } from './review-claims';
import { scheduleRejectionDigest } from './review-digest';
import { reasonByCode } from './review-reasons';

const CHANGE_WINDOW_MS = VERDICT_CHANGE_HOURS * 3600_000;

/** Clip states a verdict moves a clip into. */
export const STATE_AFTER: Record<VerdictDecision, 'accepted' | 'rejected'> = { accept: 'accepted', reject: 'rejected' };

/**
 * Gives or changes the verdict on a clip. The caller must hold the clip's claim, or be an admin. A change is
 * allowed to the curator who gave the verdict in force within VERDICT_CHANGE_HOURS of their first verdict on the
 * clip, and to an admin at any time; the old verdict stays in the history as superseded. The verdict, the clip's
 * new state, the end of the claim, the audit event and (for a rejection) the uploader's digest job commit together.
 */
export async function decideClip(
  clipId: number,
  body: VerdictBody,
  viewer: Viewer,
  now = new Date(),
): Promise<ClipDetail> {
  await Clip.sequelize!.transaction(async (transaction) => {
    const clip = await Clip.findByPk(clipId, { transaction });
    if (!clip) throw notFound(`Clip ${clipId}`);
    await checkMayDecide(clip, viewer, now, transaction);
    const current = await Verdict.findOne({ where: { clipId, supersededAt: null }, transaction });
    if (current) await checkMayChange(clip, current, viewer, now, transaction);
    const reason = body.reason ? await reasonByCode(body.reason, transaction) : null;
    await current?.update({ supersededAt: now }, { transaction });
    await Verdict.create(
      {
        clipId,
        curatorId: viewer.id,
        decision: body.decision,
        reason: reason?.code ?? null,
        reasonLabel: reason?.label ?? null,
        comment: body.comment ?? '',
        at: now,
      },
      { transaction },
    );
    await clip.update({ state: STATE_AFTER[body.decision], claimedBy: null, claimExpiresAt: null }, { transaction });
    await recordAudit(
      {
        actorId: viewer.id,
        action: current ? 'clip.verdict_change' : 'clip.verdict',
        targetType: 'clip',
        targetId: clipId,
        detail: {
          ...verdictDetail(body.decision, reason, body.comment ?? ''),
          ...(current
            ? { previous: { decision: current.decision, reason: current.reason, curatorId: current.curatorId } }
            : {}),
        },
      },
      transaction,
    );
    if (body.decision === 'reject') await scheduleRejectionDigest(clip.uploaderId, transaction, now);
  });
  return getClipDetail(clipId, viewer);
}

/** What the audit trail keeps of a verdict; `message` is the sentence a clip's history shows. */
export function verdictDetail(decision: VerdictDecision, reason: RejectReason | null, comment: string) {
  const words = decision === 'accept' ? 'accepted' : `rejected: ${reason?.label ?? 'no reason'}`;
  return {
    decision,
    reason: reason?.code ?? null,
    comment,
    message: comment ? `${words} (“${comment}”)` : words,
  };
}

async function checkMayDecide(clip: Clip, viewer: Viewer, now: Date, transaction: Transaction): Promise<void> {
  if (!['awaiting_review', 'accepted', 'rejected'].includes(clip.state)) {
    throw conflict(
      'not_reviewable',
      `Clip ${clip.id} is ${clip.state.replace('_', ' ')}; it can be decided once ` + 'processing has finished.',
    );
  }
  if (viewer.role === 'admin' || holdsLiveClaim(clip, viewer.id, now)) return;
  if (hasLiveClaim(clip, now)) throw await claimedByOther(clip, transaction);
  throw conflict(
    'claim_required',
    `Claim clip ${clip.id} before deciding it, so no one else decides it at the same time.`,
  );
}

async function checkMayChange(clip: Clip, current: Verdict, viewer: Viewer, now: Date, transaction: Transaction) {
  if (viewer.role === 'admin') return;
  if (current.curatorId !== viewer.id) {
    const giver = await User.findByPk(current.curatorId, { attributes: ['name'], transaction });
    throw new AppError(
      HttpStatus.FORBIDDEN,
      'not_your_verdict',
      `Clip ${clip.id} was decided by ` +
        `${giver?.name ?? 'another curator'}; only they (for ${VERDICT_CHANGE_HOURS} hours) or an admin can ` +
        'change it.',
    );
  }
  const first = await Verdict.min<Date, Verdict>('at', {
    where: { clipId: clip.id, curatorId: viewer.id },
    transaction,
  });
  const firstAt = new Date(first ?? current.at);
  if (now.getTime() - firstAt.getTime() > CHANGE_WINDOW_MS) {
    throw new AppError(
      HttpStatus.FORBIDDEN,
      'change_window_closed',
      `You decided clip ${clip.id} on ` +
        `${formatMailTime(firstAt)}; a curator can change a verdict for ${VERDICT_CHANGE_HOURS} hours, an admin at ` +
        'any time.',
    );
  }
}
