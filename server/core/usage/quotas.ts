import { randomUUID } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import { formatBytes } from '../../../shared/format-bytes';
import { HttpStatus } from '../../../shared/http-status';
import { AppError, conflict, notFound } from '../errors';
import { Project, UploadReservation, User } from '../models';

/** Bytes a project's clips hold now, plus bytes reserved by uploads in flight. */
export async function projectUsage(
  projectId: number,
  transaction?: Transaction,
): Promise<{ stored: number; reserved: number }> {
  const [row] = await Project.sequelize!.query<{ stored: number | null; reserved: number | null }>(
    `SELECT (SELECT SUM("storedBytes") FROM clips WHERE "projectId" = :id) AS stored,
            (SELECT SUM(bytes) FROM upload_reservations WHERE "projectId" = :id) AS reserved`,
    { replacements: { id: projectId }, type: QueryTypes.SELECT, transaction },
  );
  return { stored: Number(row?.stored ?? 0), reserved: Number(row?.reserved ?? 0) };
}

/** Bytes a user's uploads and the pairsets they built hold now, plus bytes reserved by their uploads in flight. */
export async function userUsage(
  userId: number,
  transaction?: Transaction,
): Promise<{ stored: number; reserved: number }> {
  const [row] = await User.sequelize!.query<{ stored: number | null; reserved: number | null }>(
    `SELECT COALESCE((SELECT SUM("storedBytes") FROM clips WHERE "uploaderId" = :id), 0)
              + COALESCE((SELECT SUM(bytes) FROM pairsets WHERE "ownerId" = :id), 0) AS stored,
            (SELECT SUM(bytes) FROM upload_reservations WHERE "userId" = :id) AS reserved`,
    { replacements: { id: userId }, type: QueryTypes.SELECT, transaction },
  );
  return { stored: Number(row?.stored ?? 0), reserved: Number(row?.reserved ?? 0) };
}

function overQuota(what: string, quota: number, used: number, bytes: number): AppError {
  const left = Math.max(0, quota - used);
  return new AppError(
    HttpStatus.PAYLOAD_TOO_LARGE,
    'quota_exceeded',
    `${what} quota of ${formatBytes(quota)} has ${formatBytes(left)} left; this upload needs ${formatBytes(bytes)}.`,
    { quotaBytes: quota, usedBytes: used, neededBytes: bytes },
  );
}

/**
 * Holds `bytes` against the project's and the uploader's quotas before any of the upload is read. The check and
 * the hold happen in one IMMEDIATE transaction, so two uploads can never both see room that only one fits.
 * A resumable upload passes its own id, so its reservation is found by the upload's id.
 */
export async function reserveUpload(
  projectId: number,
  userId: number,
  bytes: number,
  id: string = randomUUID(),
): Promise<string> {
  return Project.sequelize!.transaction(async (transaction) => {
    const project = await Project.findByPk(projectId, { transaction });
    if (!project) throw notFound(`Project ${projectId}`);
    if (project.archived)
      throw conflict('project_archived', `Project "${project.name}" is archived and takes no uploads.`);
    if (project.quotaBytes !== null) {
      const usage = await projectUsage(projectId, transaction);
      const used = usage.stored + usage.reserved;
      if (used + bytes > Number(project.quotaBytes)) {
        throw overQuota(`Project "${project.name}"'s`, Number(project.quotaBytes), used, bytes);
      }
    }
    const user = await User.findByPk(userId, { transaction });
    if (user?.quotaBytes !== null && user?.quotaBytes !== undefined) {
      const usage = await userUsage(userId, transaction);
      const used = usage.stored + usage.reserved;
      if (used + bytes > Number(user.quotaBytes)) throw overQuota('Your', Number(user.quotaBytes), used, bytes);
    }
    await UploadReservation.create({ id, projectId, userId, bytes }, { transaction });
    return id;
  });
}

/**
 * At admission, once the probe is known: the clip's source plus the derived bytes predicted for it must fit both
 * quotas beside everything already stored (and held by the predictions of clips not processed yet). Uploads still
 * arriving are not counted here: their reservations only refuse early what cannot fit, and each of them passes this
 * same check at its own admission, so the first to finish is the first admitted and the quota still holds. Inside
 * the transaction that creates the clip, so concurrent admissions take turns.
 */
export async function holdClipBytes(
  hold: { projectId: number; userId: number; sourceBytes: number; predictedBytes: number },
  transaction: Transaction,
): Promise<void> {
  const needed = hold.sourceBytes + hold.predictedBytes;
  const refuse = (what: string, quota: number, used: number) => {
    const left = Math.max(0, quota - used);
    return new AppError(
      HttpStatus.PAYLOAD_TOO_LARGE,
      'quota_exceeded',
      `${what} quota of ${formatBytes(quota)} has ${formatBytes(left)} left; this clip needs ` +
        `${formatBytes(needed)}: ${formatBytes(hold.sourceBytes)} of footage and a predicted ` +
        `${formatBytes(hold.predictedBytes)} of frames, motion fields and preview made from it.`,
      { quotaBytes: quota, usedBytes: used, neededBytes: needed, predictedDerivedBytes: hold.predictedBytes },
    );
  };
  const project = await Project.findByPk(hold.projectId, { transaction, lock: transaction.LOCK.UPDATE });
  if (project && project.quotaBytes !== null) {
    const used = (await projectUsage(hold.projectId, transaction)).stored;
    if (used + needed > Number(project.quotaBytes)) {
      throw refuse(`Project "${project.name}"'s`, Number(project.quotaBytes), used);
    }
  }
  const user = await User.findByPk(hold.userId, { transaction, lock: transaction.LOCK.UPDATE });
  if (user && user.quotaBytes !== null) {
    const used = (await userUsage(hold.userId, transaction)).stored;
    if (used + needed > Number(user.quotaBytes)) throw refuse('Your', Number(user.quotaBytes), used);
  }
}

export async function releaseUpload(reservationId: string, transaction?: Transaction): Promise<void> {
  await UploadReservation.destroy({ where: { id: reservationId }, transaction });
}
