import { UniqueConstraintError } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import type { ClipSummary } from '../../../shared/types/clips';
import { AppError, conflict } from '../errors';
import { Clip, Project, User } from '../models';
import type { ObjectStore } from '../storage/object-store';
import { objectKeys } from '../storage/paths';
import { recordAudit } from '../audit/audit';
import { probeUpload } from '../media/clip-probe';
import { checkQuotaThresholds } from '../usage/quota-warnings';
import { holdClipBytes, releaseUpload } from '../usage/quotas';
import { predictDerivedBytesOf } from '../usage/derived-bytes';
import { readProjectSettings } from '../projects/project-settings';
import { discardUpload, type ReceivedUpload } from './received-upload';
import { enqueueJob } from '../jobs/enqueue';

const MAX_NAME_LENGTH = 255;

/**
 * The uploaded name, kept as data only: no directories, no control characters, at most 255 characters.
 * It is shown to people and never used to build a path.
 */
export function cleanOriginalName(name: string | undefined): string {
  const base = (name ?? '').split(/[/\\]/).pop() ?? '';
  const printable = base.replace(/\p{Cc}|\p{Cf}/gu, '').trim();
  const limited = [...printable].slice(0, MAX_NAME_LENGTH).join('');
  return limited || 'unnamed video';
}

/**
 * Turns a received file into a clip: refuses empty files, exact duplicates and anything ffprobe cannot use, then
 * moves the file into the store under the clip's keys and writes the Clip and its process-clip Job in one
 * transaction. On any refusal or failure the file is deleted and its reserved bytes released.
 */
export async function admitUpload(
  upload: ReceivedUpload,
  uploadedName: string | undefined,
  uploaderId: number,
  { store, publicUrl }: { store: ObjectStore; publicUrl: string },
): Promise<ClipSummary> {
  const originalName = cleanOriginalName(uploadedName);
  const staged = objectKeys.incomingFile(`admitted-${upload.reservationId}`);
  try {
    if (upload.size === 0) {
      throw new AppError(HttpStatus.UNPROCESSABLE_ENTITY, 'not_a_usable_video', `${originalName} is empty (0 bytes).`);
    }
    await refuseDuplicate(upload, originalName);
    const { probe, ext } = await probeUpload(upload.path, originalName);
    // Sampled from the received file while it is still on this machine's disk.
    const predicted = await predictedDerivedBytes(upload.path, upload.fields.projectId, probe);
    // Into the store before the transaction: to S3 that is a streamed upload, far too long to hold the database's
    // write lock for; the commit then only moves it (a rename, or a server-side copy).
    await store.putFile(staged, upload.path, { move: true });
    const facts = { originalName, uploaderId, probe, ext, predicted };
    const clip = await commitClip(upload, facts, { store, staged }, publicUrl);
    return clip.toApi();
  } catch (error) {
    await discardUpload(upload);
    await store.delete(staged);
    if (error instanceof UniqueConstraintError) {
      await refuseDuplicate(upload, originalName);
    }
    throw error;
  }
}

async function refuseDuplicate(upload: ReceivedUpload, originalName: string): Promise<void> {
  const existing = await Clip.findOne({ where: { projectId: upload.fields.projectId, sha256: upload.sha256 } });
  if (existing) {
    throw conflict(
      'duplicate_clip',
      `${originalName} is already in this project as clip ${existing.id} ("${existing.originalName}").`,
      { clipId: existing.id },
    );
  }
}

interface ClipFacts {
  originalName: string;
  uploaderId: number;
  probe: Awaited<ReturnType<typeof probeUpload>>['probe'];
  ext: string;
  /** Derived bytes predicted from the file and the project's settings (usage/derived-bytes.ts). */
  predicted: number;
}

/** The project's sampling rate and working size applied to the file and its probe (usage/derived-bytes.ts). */
async function predictedDerivedBytes(file: string, projectId: number, probe: ClipFacts['probe']): Promise<number> {
  const project = await Project.findByPk(projectId);
  const read = project && readProjectSettings(project);
  if (!read || 'problem' in read) return 0;
  return predictDerivedBytesOf(file, probe, read.settings);
}

async function commitClip(
  upload: ReceivedUpload,
  facts: ClipFacts,
  { store, staged }: { store: ObjectStore; staged: string },
  publicUrl: string,
): Promise<Clip> {
  const { fields } = upload;
  let clipId: number | null = null;
  const { predicted } = facts;
  const clip = await Clip.sequelize!.transaction(async (transaction) => {
    await holdClipBytes(
      {
        projectId: fields.projectId,
        userId: facts.uploaderId,
        sourceBytes: upload.size,
        predictedBytes: predicted,
      },
      transaction,
    );
    const created = await Clip.create(
      {
        projectId: fields.projectId,
        uploaderId: facts.uploaderId,
        originalName: facts.originalName,
        sizeBytes: upload.size,
        storedBytes: upload.size + predicted,
        predictedDerivedBytes: predicted,
        sha256: upload.sha256,
        sourceExt: facts.ext,
        state: 'queued',
        ...facts.probe,
        site: fields.site,
        rig: fields.rig,
        capturedAt: fields.capturedAt ? new Date(fields.capturedAt) : null,
        tags: fields.tags,
        notes: fields.notes,
      },
      { transaction },
    );
    clipId = created.id;
    await enqueueJob('process-clip', { clipId: created.id }, { transaction });
    await recordAudit(
      {
        actorId: facts.uploaderId,
        action: 'clip.upload',
        targetType: 'clip',
        targetId: created.id,
        detail: { originalName: facts.originalName, sizeBytes: upload.size, projectId: fields.projectId },
      },
      transaction,
    );
    await releaseUpload(upload.reservationId, transaction);
    await checkQuotaThresholds(fields.projectId, facts.uploaderId, publicUrl, transaction);
    // The move is one rename (or one server-side copy): done last inside the transaction, so the row commits only
    // once the source is in place, and a failed move rolls the rows back.
    await store.move(staged, objectKeys.clipSource(created.id, facts.ext));
    return created;
  }).catch(async (error: unknown) => {
    // The commit itself failed after the move: take the clip's objects away so none outlives its missing row.
    if (clipId !== null) await store.delete(objectKeys.clipDir(clipId));
    throw error;
  });
  await clip.reload({
    include: [
      { model: Project, as: 'project' },
      { model: User, as: 'uploader' },
    ],
  });
  return clip;
}
