import { Op, literal, where, type Transaction } from 'sequelize';
import { DIGEST_INTERVAL_MINUTES } from '../../../shared/review/rules';
import { queueMail } from '../mail/outbox';
import { Clip, Job, RejectionDigest, User, Verdict } from '../models';
import { jsonInteger } from '../db/dialect';
import { enqueueJob } from '../jobs/enqueue';

/**
 * The hourly rejection digest. Design: no clock runs it. A rejection queues one `send-rejection-digest` job for the
 * clip's uploader, unless one is queued already, due at the later of now and the last digest + the interval. The
 * job lists the uploader's rejections in force that no digest has listed yet (a rejection changed to an acceptance
 * before it runs drops out), and checks the interval again itself, so an uploader gets at most one message per
 * interval however many jobs exist. Nothing is lost across restarts: the job and the unlisted verdicts are rows.
 */

const INTERVAL_MS = DIGEST_INTERVAL_MINUTES * 60_000;
const JOB_KIND = 'send-rejection-digest';

/** When the uploader may get their next digest: the last one plus the interval, or now. */
async function nextAllowedAt(uploaderId: number, now: Date, transaction: Transaction): Promise<Date> {
  const last = await RejectionDigest.findOne({ where: { uploaderId }, order: [['at', 'DESC']], transaction });
  return last ? new Date(Math.max(now.getTime(), last.at.getTime() + INTERVAL_MS)) : now;
}

/** Queues the uploader's digest job, in the caller's transaction, unless one is waiting already. */
export async function scheduleRejectionDigest(uploaderId: number, transaction: Transaction, now = new Date()) {
  // A literal path: Sequelize would double the `$` of a JSON path given as a string value.
  const payloadUploader = where(literal(jsonInteger(Job.sequelize!, 'payload', 'uploaderId')), uploaderId);
  const waiting = await Job.findOne({
    where: { kind: JOB_KIND, state: 'queued', [Op.and]: [payloadUploader] },
    attributes: ['id'],
    transaction,
  });
  if (waiting) return;
  await enqueueJob(
    JOB_KIND,
    { uploaderId },
    { transaction, runAfter: await nextAllowedAt(uploaderId, now, transaction) },
  );
}

export type DigestOutcome = 'sent' | 'nothing-new' | 'too-soon';

/**
 * Writes the uploader's digest to the outbox and marks the listed verdicts, in one transaction. Too soon after
 * the last digest, it queues a job for the allowed time instead (a second job may exist when a rejection came in
 * while this one ran).
 */
export async function sendRejectionDigest(
  uploaderId: number,
  publicUrl: string,
  now = new Date(),
): Promise<DigestOutcome> {
  return Verdict.sequelize!.transaction(async (transaction) => {
    const uploader = await User.findByPk(uploaderId, { transaction });
    // A disabled account reads no mail; its rejections stay unlisted for a later digest.
    if (!uploader || uploader.disabled) return 'nothing-new';
    const pending = await Verdict.findAll({
      where: { decision: 'reject', supersededAt: null, digestId: null },
      include: [{ model: Clip, as: 'clip', attributes: ['id', 'originalName'], where: { uploaderId }, required: true }],
      order: [
        ['at', 'ASC'],
        ['id', 'ASC'],
      ],
      transaction,
    });
    if (pending.length === 0) return 'nothing-new';
    if ((await nextAllowedAt(uploaderId, now, transaction)) > now) {
      await scheduleRejectionDigest(uploaderId, transaction, now);
      return 'too-soon';
    }
    const digest = await RejectionDigest.create({ uploaderId, at: now, clipCount: pending.length }, { transaction });
    await Verdict.update({ digestId: digest.id }, { where: { id: pending.map((verdict) => verdict.id) }, transaction });
    await queueMail(
      {
        to: uploader.email,
        template: 'rejection-digest',
        data: {
          name: uploader.name,
          clips: pending.map((verdict) => {
            const clip = verdict.get('clip') as Clip;
            return {
              clipId: clip.id,
              originalName: clip.originalName,
              reason: verdict.reasonLabel ?? 'no reason given',
              comment: verdict.comment,
            };
          }),
        },
      },
      { transaction, publicUrl },
    );
    return 'sent';
  });
}
