import { z } from 'zod';
import { STORED_VIEWS } from '../pipeline-stages';

const clipId = z.coerce.number().int().positive('id must be a positive number');
const frameIndex = z.coerce.number().int().min(0, 'index must be 0 or more').max(2 ** 31 - 1);

/** `/:id/frames/:index` in a path. */
export const frameParamSchema = z.strictObject({ id: clipId, index: frameIndex });
export type FrameParam = z.infer<typeof frameParamSchema>;

/** `/:id/views/:index/:view` in a path: `luma` or `chroma`. */
export const viewParamSchema = z.strictObject({
  id: clipId,
  index: frameIndex,
  view: z.enum(STORED_VIEWS, { message: `view must be one of ${STORED_VIEWS.join(', ')}` }),
});
export type ViewParam = z.infer<typeof viewParamSchema>;
