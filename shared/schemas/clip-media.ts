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
