import { z } from 'zod';
import { REVIEW_SORT_FIELDS, reviewFilterShape } from './review';
import { listQuerySchema } from './list-query';

/** Most clips one "what comes next" answer lists: the next clip and a few spares for clips held meanwhile. */
export const MAX_NEXT_CLIPS = 10;

/**
 * The clips that follow `after` in the queue under the curator's filter and order. Paging is the queue
 * screen's business, so page and pageSize are refused here; the client drops them from the URL's query.
 */
export const reviewNextQuerySchema = listQuerySchema(REVIEW_SORT_FIELDS)
  .omit({ page: true, pageSize: true })
  .extend({
    ...reviewFilterShape,
    after: z.coerce.number({ message: 'after must be a clip id' }).int().positive('after must be a clip id'),
    limit: z.coerce.number().int().min(1).max(MAX_NEXT_CLIPS, `limit is at most ${MAX_NEXT_CLIPS}`).default(3),
  });
export type ReviewNextQuery = z.infer<typeof reviewNextQuerySchema>;

/** Undo names the verdict it undoes, so a verdict given meanwhile (by an admin, say) is never undone by mistake. */
export const undoVerdictBodySchema = z.strictObject({
  verdictId: z.number({ message: 'verdictId must be a verdict id' }).int().positive('verdictId must be a verdict id'),
});
export type UndoVerdictBody = z.infer<typeof undoVerdictBodySchema>;

/** `/:id/compare/:otherId`: the clip under review and the one its frames match. */
export const compareParamSchema = z.strictObject({
  id: z.coerce.number().int().positive('id must be a positive number'),
  otherId: z.coerce.number().int().positive('otherId must be a positive number'),
});
export type CompareParam = z.infer<typeof compareParamSchema>;
