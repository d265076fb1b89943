import { Op } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import { AppError, notFound } from '../errors';
import { Frame, MotionField } from '../models';
import type { StoragePaths } from '../storage/paths';
import { existingClip, existingFile } from './clip-media';

/** A stored forward motion field as a file: its colour picture (PNG) or the field itself (Middlebury .flo). */
export type MotionFile = 'picture' | 'flo';

/**
 * The file of the forward field from frame `index` to `index` + 1. Where no field can exist, the 404 says why:
 * the frame is the clip's last, or a cut follows it (no field spans a cut); or the fields are not made yet.
 */
export async function motionFieldPath(clipId: number, index: number, file: MotionFile, paths: StoragePaths) {
  await existingClip(clipId);
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
  const layout = paths.clipDerived(clipId);
  return existingFile(file === 'flo' ? layout.motionFlo(index) : layout.motionPicture(index), what);
}

function noField(message: string): AppError {
  return new AppError(HttpStatus.NOT_FOUND, 'no_motion_field', message);
}
