import { Op } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import { encodeFlo } from '../../../shared/motion/formats/flo';
import { clipMotionScale } from '../../../shared/motion/motion-scale';
import { AppError, notFound } from '../errors';
import { motionPicturePng, readStoredField } from '../media/stored-field';
import { Frame, MotionField, type Clip } from '../models';
import type { ObjectStore, StoredRef } from '../storage/object-store';
import { objectKeys } from '../storage/paths';
import { existingClip, storedBytes } from './clip-media';
import { madePicture, processingStamp, rememberedScale, type MadePicture } from './made-pictures';

/** A stored forward motion field as a file: its colour picture (PNG) or the field itself (Middlebury .flo). */
export type MotionFile = 'picture' | 'flo';

/**
 * The forward field from frame `index` to `index` + 1 as a Middlebury .flo or as its colour picture, both made
 * from the stored field when asked and known by an ETag before (made-pictures.ts). The picture uses the clip's
 * motion scale (the one the frame list reports, worked out once per processing of the clip), so pictures compare
 * within the clip. Where no field can exist, the 404 says why: the frame is the clip's last, or a cut follows it
 * (no field spans a cut); or the fields are not made yet.
 */
export async function motionFieldPicture(
  clipId: number,
  index: number,
  file: MotionFile,
  store: ObjectStore,
): Promise<MadePicture> {
  const clip = await existingClip(clipId);
  const stored = await storedFieldObject(clip, index);
  const stamp = processingStamp(clip);
  const field = async () => readStoredField(await storedBytes(store, stored), stored.key);
  if (file === 'flo') {
    // A .flo is 8 bytes a pixel and rarely asked twice: known by its ETag, not kept.
    const flo = async () => {
      const { flow, width, height } = await field();
      return Buffer.from(encodeFlo(flow, width, height));
    };
    return madePicture(['flo', clipId, index, stamp], flo, { keep: false });
  }
  const scale = await rememberedScale(clipId, stamp, () => clipMotionScalePx(clipId));
  return madePicture(['motion', clipId, index, stamp, scale], async () => motionPicturePng(await field(), scale));
}

export async function motionFieldFile(clipId: number, index: number, file: MotionFile, store: ObjectStore) {
  return (await motionFieldPicture(clipId, index, file, store)).bytes();
}

async function clipMotionScalePx(clipId: number): Promise<number> {
  const cuts = await Frame.findAll({ where: { clipId, cutBefore: true }, attributes: ['index'] });
  const fields = await MotionField.forwardOfClip(clipId);
  return clipMotionScale(fields, new Set(cuts.map((frame) => frame.index)))?.pxPerStep ?? 0;
}

async function storedFieldObject(clip: Clip, index: number): Promise<StoredRef> {
  const clipId = clip.id;
  const frames = await Frame.findAll({
    where: { clipId, index: { [Op.in]: [index, index + 1] } },
    attributes: ['index', 'cutBefore'],
  });
  const next = frames.find((frame) => frame.index === index + 1);
  if (!frames.some((frame) => frame.index === index)) throw notFound(`Frame ${index} of clip ${clipId}`);
  if (!next) throw noField(`Frame ${index} is the last frame of clip ${clipId}, so no motion field starts there.`);
  if (next.cutBefore) {
    throw noField(
      `A cut lies between frames ${index} and ${index + 1} of clip ${clipId}, and no motion field ` + 'spans a cut.',
    );
  }
  const what =
    `The motion field from frame ${index} to ${index + 1} of clip ${clipId} (fields are made after the ` +
    'signals stage)';
  if (!(await MotionField.findOne({ where: { clipId, fromIndex: index, direction: 'forward' }, attributes: ['id'] }))) {
    throw notFound(what);
  }
  return { key: objectKeys.clipDerived(clipId, clip.derivedFormat).motionField(index), what };
}

function noField(message: string): AppError {
  return new AppError(HttpStatus.NOT_FOUND, 'no_motion_field', message);
}
