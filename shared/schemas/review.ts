import { z } from 'zod';
import { FLAG_NAMES, type FlagName } from '../flag-thresholds';
import { MAX_BULK_CLIPS, VERDICT_DECISIONS } from '../review/rules';
import { clipListQuerySchema } from './clips';
import { listQuerySchema } from './list-query';

/** Signals and times the queue sorts by; each has an index with the state (migration 0006-review). */
export const REVIEW_SORT_FIELDS = [
  'createdAt',
  'capturedAt',
  'durationS',
  'medianSharpness',
  'meanLuma',
  'meanMotion',
  'consistentShare',
  'cutCount',
  'usablePairs',
  'flagCount',
] as const;
export type ReviewSortField = (typeof REVIEW_SORT_FIELDS)[number];

/** Flags as a comma-separated list in a query string, or as an array in a JSON body. */
const flagList = z.preprocess(
  (value) =>
    typeof value === 'string'
      ? value
          .split(',')
          .map((flag) => flag.trim())
          .filter(Boolean)
      : value,
  z
    .array(
      z.enum(FLAG_NAMES as [FlagName, ...FlagName[]], { message: `each flag must be one of ${FLAG_NAMES.join(', ')}` }),
    )
    .max(FLAG_NAMES.length),
);

const clipFilters = clipListQuerySchema.shape;

/** What narrows the queue; the same object in the URL of the queue screen and as a bulk action's `filter`. */
export const reviewFilterShape = {
  projectId: clipFilters.projectId,
  /** Every one of these flags is raised. */
  hasFlag: flagList.optional(),
  /** None of these flags is raised. */
  lacksFlag: flagList.optional(),
  /** `true`: at least one flag; `false`: none at all. */
  flagged: z.enum(['true', 'false']).optional(),
  site: clipFilters.site,
  uploaderId: clipFilters.uploaderId,
  capturedFrom: clipFilters.capturedFrom,
  capturedTo: clipFilters.capturedTo,
};

export const reviewFilterSchema = z.strictObject(reviewFilterShape);
export type ReviewFilter = z.infer<typeof reviewFilterSchema>;

export const reviewQueueQuerySchema = listQuerySchema(REVIEW_SORT_FIELDS).extend(reviewFilterShape);
export type ReviewQueueQuery = z.infer<typeof reviewQueueQuerySchema>;

const reasonCode = z
  .string()
  .trim()
  .regex(/^[a-z0-9][a-z0-9-]{0,39}$/, 'a reason code is 1–40 lower-case letters, digits and hyphens');

const decisionShape = {
  decision: z.enum(VERDICT_DECISIONS, { message: 'decision must be accept or reject' }),
  reason: reasonCode.optional(),
  comment: z.string().trim().max(2000, 'comment must be at most 2000 characters').optional(),
};

type DecisionInput = { decision: string; reason?: string };

/** A rejection needs a reason; an acceptance takes none (the reasons list says why footage is unusable). */
function reasonFitsDecision(body: DecisionInput, ctx: z.RefinementCtx): void {
  if (body.decision === 'reject' && !body.reason) {
    ctx.addIssue({ code: 'custom', path: ['reason'], message: 'a rejection needs a reason from the list' });
  }
  if (body.decision === 'accept' && body.reason) {
    ctx.addIssue({ code: 'custom', path: ['reason'], message: 'only a rejection takes a reason' });
  }
}

export const verdictBodySchema = z.strictObject(decisionShape).superRefine(reasonFitsDecision);
export type VerdictBody = z.infer<typeof verdictBodySchema>;

export const bulkBodySchema = z
  .strictObject({
    ...decisionShape,
    clipIds: z
      .array(z.number().int().positive('each clip id must be a positive number'))
      .min(1, 'clipIds needs at least one clip')
      .max(MAX_BULK_CLIPS, `at most ${MAX_BULK_CLIPS} clips at once`)
      .optional(),
    filter: reviewFilterSchema.optional(),
  })
  .superRefine((body, ctx) => {
    if ((body.clipIds === undefined) === (body.filter === undefined)) {
      ctx.addIssue({ code: 'custom', path: ['clipIds'], message: 'give either clipIds or filter' });
    }
    reasonFitsDecision(body, ctx);
  });
export type BulkBody = z.infer<typeof bulkBodySchema>;
/** What a client may send: the filter as the queue's query strings (numbers and flag lists as text) will do. */
export type BulkBodyInput = z.input<typeof bulkBodySchema>;

export const MAX_REJECT_REASONS = 30;

export const rejectReasonsBodySchema = z.strictObject({
  reasons: z
    .array(
      z.strictObject({
        code: reasonCode,
        label: z.string().trim().min(1, 'a reason needs a label').max(80, 'a label is at most 80 characters'),
      }),
    )
    .min(1, 'reasons needs at least one reason')
    .max(MAX_REJECT_REASONS, `at most ${MAX_REJECT_REASONS} reasons`)
    .refine((reasons) => new Set(reasons.map((r) => r.code)).size === reasons.length, 'reason codes must not repeat')
    .refine(
      (reasons) => new Set(reasons.map((r) => r.label.toLowerCase())).size === reasons.length,
      'reason labels must not repeat',
    ),
});
export type RejectReasonsBody = z.infer<typeof rejectReasonsBodySchema>;

/** A GET that takes no query parameters still refuses unknown ones. */
export const noQuerySchema = z.strictObject({});
