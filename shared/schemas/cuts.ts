import { z } from 'zod';

/** `PUT /api/clips/:id/cuts/:index`: a curator's mark before frame `index`. */
export const cutMarkBodySchema = z.strictObject({
  value: z.enum(['cut', 'none'], { message: 'value must be "cut" (a cut before this frame) or "none" (no cut)' }),
});
export type CutMarkBody = z.infer<typeof cutMarkBodySchema>;
