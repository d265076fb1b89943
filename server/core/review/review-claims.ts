import { QueryTypes, type Transaction } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import { CLAIM_MINUTES } from '../../../shared/review/rules';
import type { ClipClaim } from '../../../shared/types/review';
import { AppError, conflict, notFound } from '../errors';
import { formatMailTime } from '../mail/templates/layout';
import { Clip, User } from '../models';
import { recordAudit } from '../audit/audit';
import type { Viewer } from '../people/viewer';

/**
 * Review claims: a curator holds a clip for CLAIM_MINUTES, renewed by claiming again. A claim is the pair
 * (claimedBy, claimExpiresAt) on the clip and counts only while claimExpiresAt lies ahead, so an abandoned claim
 * is gone by itself with nothing to sweep. Taking one is a single conditional UPDATE, so two curators can never
 * both get the same clip.
 */

/** Clips a claim makes sense on: waiting for a verdict, or decided (to change the verdict within the rules). */
const CLAIMABLE_STATES = ['awaiting_review', 'accepted', 'rejected'];

export function holdsLiveClaim(clip: Clip, userId: number, now: Date): boolean {
  return clip.claimedBy === userId && clip.claimExpiresAt !== null && clip.claimExpiresAt > now;
}

export function hasLiveClaim(clip: Clip, now: Date): boolean {
  return clip.claimedBy !== null && clip.claimExpiresAt !== null && clip.claimExpiresAt > now;
}

/** Takes the claim, or renews it for its holder; 409 naming the holder when someone else has it. */
export async function claimClip(
  clipId: number,
  viewer: Viewer & { name: string },
  now = new Date(),
): Promise<ClipClaim> {
  const expiresAt = new Date(now.getTime() + CLAIM_MINUTES * 60_000);
  const taken = await Clip.sequelize!.query(
    `UPDATE clips SET "claimedBy" = :userId, "claimExpiresAt" = :expiresAt
     WHERE id = :clipId AND state IN (:states)
       AND ("claimedBy" IS NULL OR "claimedBy" = :userId OR "claimExpiresAt" IS NULL OR "claimExpiresAt" <= :now)
     RETURNING id`,
    { replacements: { clipId, userId: viewer.id, expiresAt, now, states: CLAIMABLE_STATES }, type: QueryTypes.SELECT },
  );
  if (taken.length > 0) {
    return { clipId, holderId: viewer.id, holderName: viewer.name, expiresAt: expiresAt.toISOString() };
  }
  const clip = await Clip.findByPk(clipId);
  if (!clip) throw notFound(`Clip ${clipId}`);
  if (!CLAIMABLE_STATES.includes(clip.state)) {
    throw conflict(
      'not_reviewable',
      `Clip ${clipId} is ${clip.state.replace('_', ' ')}; only clips awaiting review ` +
        'or already decided can be claimed.',
    );
  }
  throw await claimedByOther(clip);
}

/** The 409 that names who holds a clip and until when; the details carry the claim for screens. */
export async function claimedByOther(clip: Clip, transaction?: Transaction): Promise<AppError> {
  const claim = await claimOf(clip, transaction);
  const holder = claim?.holderName ?? 'someone else';
  const until = clip.claimExpiresAt ? ` until ${formatMailTime(clip.claimExpiresAt)}` : '';
  return conflict('claimed', `Clip ${clip.id} is claimed by ${holder}${until}.`, { claim });
}

/** The clip's live claim with its holder's name, or null. */
export async function claimOf(clip: Clip, transaction?: Transaction, now = new Date()): Promise<ClipClaim | null> {
  if (!hasLiveClaim(clip, now)) return null;
  const holder = await User.findByPk(clip.claimedBy!, { attributes: ['id', 'name'], transaction });
  return {
    clipId: clip.id,
    holderId: clip.claimedBy!,
    holderName: holder?.name ?? 'a former user',
    expiresAt: clip.claimExpiresAt!.toISOString(),
  };
}

/**
 * Lets go of a claim: its holder, or an admin for anyone's. Nothing happens (and nothing is recorded) when no
 * live claim exists; a release that happens is recorded in the clip's history.
 */
export async function releaseClaim(clipId: number, viewer: Viewer, now = new Date()): Promise<void> {
  await Clip.sequelize!.transaction(async (transaction) => {
    const clip = await Clip.findByPk(clipId, { transaction });
    if (!clip) throw notFound(`Clip ${clipId}`);
    const claim = await claimOf(clip, transaction, now);
    if (!claim) return;
    if (claim.holderId !== viewer.id && viewer.role !== 'admin') {
      throw new AppError(
        HttpStatus.FORBIDDEN,
        'not_holder',
        `Only ${claim.holderName}, who holds the claim on clip ${clipId}, or an admin can release it.`,
      );
    }
    await clip.update({ claimedBy: null, claimExpiresAt: null }, { transaction, silent: true });
    const own = claim.holderId === viewer.id;
    await recordAudit(
      {
        actorId: viewer.id,
        action: 'clip.claim_release',
        targetType: 'clip',
        targetId: clipId,
        detail: {
          holderId: claim.holderId,
          holderName: claim.holderName,
          message: own ? 'left the clip undecided' : `ended ${claim.holderName}'s claim`,
        },
      },
      transaction,
    );
  });
}
