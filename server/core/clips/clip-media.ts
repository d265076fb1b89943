import { Op } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import { clipMotionScale } from '../../../shared/motion/motion-scale';
import type { ClipStage, FrameView } from '../../../shared/pipeline-stages';
import { shrunkWebp } from '../media/frame-images';
import { viewPng } from '../media/frame-views';
import type { ClipFrameList, ClipProgress } from '../../../shared/types/frames';
import { AppError, conflict, notFound } from '../errors';
import { Clip, Frame, Job, MotionField } from '../models';
import type { ObjectStore, StoredRef } from '../storage/object-store';
import { objectKeys } from '../storage/paths';
import { recordAudit } from '../audit/audit';
import { enqueueJob } from '../jobs/enqueue';
import { madePicture, processingStamp, type MadePicture } from './made-pictures';

/**
 * What processing made of a clip (frames, signals, views, preview, thumbnail, progress) and starting it again.
 * Motion field files: clip-motion.ts.
 * Stored files are answered as object keys for the route to stream; a key is always built from ids (storage/paths.ts).
 * Views are derived from the frame when asked (media/frame-views.ts), known by an ETag before they are made and
 * kept in memory a while (made-pictures.ts).
 */

/** Frames with the summary of the forward motion field from each, and the scale of the clip's motion pictures. */
export async function listFrames(clipId: number): Promise<ClipFrameList> {
  await existingClip(clipId);
  const frames = await Frame.findAll({ where: { clipId }, order: [['index', 'ASC']] });
  const fields = new Map((await MotionField.forwardOfClip(clipId)).map((field) => [field.fromIndex, field]));
  return {
    items: frames.map((frame) => frame.toApi(fields.get(frame.index)?.toFrameMotion() ?? null)),
    total: frames.length,
    motionScale: clipMotionScale(
      [...fields.values()],
      new Set(frames.filter((frame) => frame.cutBefore).map((frame) => frame.index)),
    ),
  };
}

export async function frameObject(clipId: number, index: number): Promise<StoredRef> {
  return frameRef(await existingFrame(clipId, index), index);
}

function frameRef(clip: Clip, index: number): StoredRef {
  return {
    key: objectKeys.clipDerived(clip.id, clip.derivedFormat).frame(index),
    what: `Frame ${index} of clip ${clip.id}`,
  };
}

/** The stored frame shrunk to `height` pixels high (WebP), for the frame strip. */
export function shrunkFramePicture(clipId: number, index: number, height: number, store: ObjectStore) {
  return madeFromFrame(clipId, index, store, ['frame', height], (frame) => shrunkWebp(frame, height));
}

/** The luma or chroma view of a frame as PNG, derived from the stored frame. */
export function viewPicture(clipId: number, index: number, view: FrameView, store: ObjectStore) {
  return madeFromFrame(clipId, index, store, ['view', view], (frame) => viewPng(frame, view));
}

/**
 * A picture made from a stored frame, known by `what` (it must name everything `make` depends on) with the clip,
 * the frame and the clip's processing stamp.
 */
async function madeFromFrame(
  clipId: number,
  index: number,
  store: ObjectStore,
  [kind, variant]: [string, string | number],
  make: (frame: Buffer) => Promise<Buffer>,
): Promise<MadePicture> {
  const clip = await existingFrame(clipId, index);
  return madePicture([kind, clipId, index, variant, processingStamp(clip)], async () =>
    make(await storedBytes(store, frameRef(clip, index))),
  );
}

export async function viewImage(clipId: number, index: number, view: FrameView, store: ObjectStore): Promise<Buffer> {
  return (await viewPicture(clipId, index, view, store)).bytes();
}

export async function thumbnailObject(clipId: number): Promise<StoredRef> {
  await existingClip(clipId);
  return { key: objectKeys.clipDerived(clipId).thumbnail, what: `The thumbnail of clip ${clipId}` };
}

export async function previewObject(clipId: number): Promise<StoredRef> {
  await existingClip(clipId);
  return { key: objectKeys.clipDerived(clipId).preview, what: `The preview of clip ${clipId}` };
}

/** The clip's state, the stage running or failed, and the share of that stage done (its latest job's). */
export async function clipProgress(clipId: number): Promise<ClipProgress> {
  const clip = await existingClip(clipId);
  const job = await Job.findOne({ where: { clipId, kind: 'process-clip' }, order: [['id', 'DESC']] });
  return { state: clip.state, stage: clip.stage as ClipStage | null, progress: job?.progress ?? 0 };
}

/**
 * Queues processing of a clip again: after a failure, or after the project's settings changed. The worker replaces
 * the derived files stage by stage (each output renamed into place) and keeps a verdict. Refused while the clip
 * is queued or processing already, and for a clip whose footage was purged.
 */
export async function reprocessClip(clipId: number, actorId: number): Promise<ClipProgress> {
  const clip = await existingClip(clipId);
  if (clip.purgedAt) {
    throw new AppError(
      HttpStatus.GONE,
      'purged',
      `Clip ${clipId}'s footage was purged on ${clip.purgedAt.toISOString()}; there is nothing to process.`,
    );
  }
  await Clip.sequelize!.transaction(async (transaction) => {
    const active = await Job.findOne({
      where: { clipId, kind: 'process-clip', state: { [Op.in]: ['queued', 'running'] } },
      transaction,
    });
    if (active) {
      throw conflict('already_processing', `Clip ${clipId} is being processed already (job ${active.id}).`);
    }
    await enqueueJob('process-clip', { clipId }, { transaction });
    const reviewed = clip.state === 'accepted' || clip.state === 'rejected';
    await clip.update({ state: reviewed ? clip.state : 'queued', stage: null, error: null }, { transaction });
    await recordAudit(
      {
        actorId,
        action: 'clip.reprocess',
        targetType: 'clip',
        targetId: clipId,
        detail: { previousState: clip.state },
      },
      transaction,
    );
  });
  return clipProgress(clipId);
}

export async function existingClip(clipId: number): Promise<Clip> {
  const clip = await Clip.findByPk(clipId);
  if (!clip) throw notFound(`Clip ${clipId}`);
  return clip;
}

async function existingFrame(clipId: number, index: number): Promise<Clip> {
  const clip = await existingClip(clipId);
  if (!(await Frame.findOne({ where: { clipId, index }, attributes: ['id'] }))) {
    throw notFound(`Frame ${index} of clip ${clipId}`);
  }
  return clip;
}

/** A small stored object's bytes, or a 404 saying what is missing (not made yet, or removed). */
export async function storedBytes(store: ObjectStore, { key, what }: StoredRef): Promise<Buffer> {
  const bytes = await store.getBytes(key);
  if (!bytes) throw notFound(what);
  return bytes;
}
