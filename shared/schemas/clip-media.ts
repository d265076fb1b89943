import { z } from 'zod';
import { FRAME_VIEWS } from '../pipeline-stages';
import { pathNumber } from './path-number';

const clipId = pathNumber('id', { min: 1 });
const frameIndex = pathNumber('index', { min: 0 });

/** `/:id/frames/:index` in a path. */
export const frameParamSchema = z.strictObject({ id: clipId, index: frameIndex });
export type FrameParam = z.infer<typeof frameParamSchema>;

/** `/:id/views/:index/:view` in a path: `luma` or `chroma`. */
export const viewParamSchema = z.strictObject({
  id: clipId,
  index: frameIndex,
  view: z.enum(FRAME_VIEWS, { message: `view must be one of ${FRAME_VIEWS.join(', ')}` }),
});
export type ViewParam = z.infer<typeof viewParamSchema>;

/**
 * Heights (pixels) a frame or motion picture can be asked for, shrunk: the frame strip's drawn heights (34 on the
 * review screen, 54 on the clip page) and twice those for high-density screens. A fixed list keeps the number of
 * kept copies bounded.
 */
export const PICTURE_HEIGHTS = [34, 54, 68, 108] as const;
export type PictureHeight = (typeof PICTURE_HEIGHTS)[number];

/** `?height=` on a frame or motion picture: that many pixels high; absent, the picture as stored or made. */
export const pictureHeightQuerySchema = z.strictObject({
  height: z.coerce
    .number()
    .refine((height): height is PictureHeight => (PICTURE_HEIGHTS as readonly number[]).includes(height), {
      message: `height must be one of ${PICTURE_HEIGHTS.join(', ')}`,
    })
    .optional(),
});
export type PictureHeightQuery = z.infer<typeof pictureHeightQuerySchema>;
