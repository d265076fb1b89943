import { z } from 'zod';
import { ESTIMATORS, type EstimatorName } from '../estimators';
import { issueField } from './issue-field';

/**
 * A project's processing settings, checked by one schema when an admin saves them and again when the worker reads
 * them, so a saved project can never fail in the worker on its settings. The ranges of each estimator's parameters
 * live here; the estimators check their parameters with these same schemas.
 */

/** An integer in lo..hi, with the message the estimators have always given. */
function integerIn(lo: number, hi: number) {
  const message = `must be an integer in ${lo}..${hi}`;
  return z.number({ error: message }).int(message).min(lo, message).max(hi, message);
}

/** lo < value < hi, or lo ≤ value when `lowInclusive`; NaN and infinities fail. */
function numberIn(lo: number, hi: number, lowInclusive: boolean) {
  const message = `must be in ${lowInclusive ? '[' : '('}${lo}, ${hi})`;
  return z.number({ error: message }).refine((v) => (lowInclusive ? v >= lo : v > lo) && v < hi, message);
}

const flag = z.boolean({ error: 'must be true or false' });
const LEVELS = integerIn(0, 20);
const PYRAMID_SCALE = numberIn(0, 1, false);

export const farnebackParamsSchema = z.strictObject({
  pyrScale: PYRAMID_SCALE,
  levels: LEVELS,
  winSize: integerIn(1, 255),
  iterations: integerIn(1, 1000),
  polyN: integerIn(1, 15),
  polySigma: numberIn(0, Number.POSITIVE_INFINITY, true),
  gaussianWindow: flag,
});

export const hornSchunckParamsSchema = z.strictObject({
  alpha: numberIn(0, Number.POSITIVE_INFINITY, false),
  iterations: integerIn(1, 10000),
  warps: integerIn(1, 50),
  levels: LEVELS,
  pyrScale: PYRAMID_SCALE,
});

export const lucasKanadeParamsSchema = z.strictObject({
  levels: LEVELS,
  pyrScale: PYRAMID_SCALE,
  windowSigma: numberIn(0, 50, false),
  iterations: integerIn(1, 1000),
  regularisation: numberIn(0, Number.POSITIVE_INFINITY, true),
});

const DIS_WEIGHT = numberIn(0, 1e6, true);
const disParamsShape = z.strictObject({
  finestScale: integerIn(0, 10),
  patchSize: integerIn(2, 32),
  patchStride: z.number().int('must be an integer').min(1, 'must be at least 1'),
  descentIterations: integerIn(2, 1000),
  refinementIterations: integerIn(0, 1000),
  alpha: DIS_WEIGHT,
  delta: DIS_WEIGHT,
  gamma: DIS_WEIGHT,
  meanNormalisation: flag,
});
export const disParamsSchema = disParamsShape.refine((p) => p.patchStride <= p.patchSize, {
  path: ['patchStride'],
  error: (issue) => {
    const input = issue.input as { patchSize: number };
    return `must be an integer in 1..${input.patchSize}`;
  },
});

/** Every parameter of each estimator, complete (what a field records). */
export const ESTIMATOR_PARAM_SCHEMAS = {
  farneback: farnebackParamsSchema,
  'horn-schunck': hornSchunckParamsSchema,
  'lucas-kanade': lucasKanadeParamsSchema,
  dis: disParamsSchema,
} as const satisfies Record<EstimatorName, z.ZodType>;

/** A project's overrides of its estimator's parameters: any subset of them, nothing else. */
const OVERRIDE_SCHEMAS = {
  farneback: farnebackParamsSchema.partial(),
  'horn-schunck': hornSchunckParamsSchema.partial(),
  'lucas-kanade': lucasKanadeParamsSchema.partial(),
  dis: disParamsShape.partial(),
} as const satisfies Record<EstimatorName, z.ZodType>;

export function estimatorOverridesSchema(estimator: EstimatorName): z.ZodType {
  return OVERRIDE_SCHEMAS[estimator];
}

const SHARE = z.number().min(0, 'must be in 0..1').max(1, 'must be in 0..1');
const GREY = z.number().min(0, 'must be in 0..255').max(255, 'must be in 0..255');
const NOT_NEGATIVE = z.number().min(0, 'must be 0 or more').max(1e9, 'must be at most 1e9');

/**
 * Flag thresholds (see flag-thresholds.ts for their meaning and defaults) and the cut threshold, any subset.
 * The cut score is 1 − correlation of grey histograms, in 0..2.
 */
export const flagThresholdsSchema = z.strictObject({
  darkMeanLuma: GREY.optional(),
  overexposedMeanLuma: GREY.optional(),
  overexposedClippedShare: SHARE.optional(),
  blurryLaplacianVariance: NOT_NEGATIVE.optional(),
  shortDurationS: NOT_NEGATIVE.optional(),
  shortFrames: z.number().int('must be a whole number of frames').min(0).max(100000).optional(),
  cutHeavyPerMinute: NOT_NEGATIVE.optional(),
  duplicateShare: SHARE.optional(),
  duplicateHashDistance: z
    .number()
    .int('must be a whole number of bits')
    .min(0, 'must be in 0..64')
    .max(64, 'must be in 0..64')
    .optional(),
  staticMeanMagnitude: NOT_NEGATIVE.optional(),
  shakyJitter: NOT_NEGATIVE.optional(),
  cutThreshold: z
    .number()
    .gt(0, 'must be more than 0 and at most 2')
    .max(2, 'must be more than 0 and at most 2')
    .optional(),
});
export type StoredFlagThresholds = z.infer<typeof flagThresholdsSchema>;

export const MAX_DELTA = 30;

export const settingsFields = {
  sampleFps: z.number().min(0.5, 'sampleFps must be at least 0.5 frames/s').max(30, 'sampleFps must be at most 30'),
  workingSize: z
    .number()
    .int()
    .min(64, 'workingSize must be at least 64 px')
    .max(1920, 'workingSize must be at most 1920 px'),
  deltas: z
    .array(z.number().int().min(1).max(MAX_DELTA))
    .min(1, 'deltas needs at least one offset')
    .max(8)
    .refine((values) => new Set(values).size === values.length, 'deltas must not repeat'),
  estimator: z.enum(ESTIMATORS),
  /** Checked against the chosen estimator by `projectSettingsSchema`. */
  estimatorParams: z.record(z.string(), z.union([z.number(), z.string(), z.boolean()])),
  flagThresholds: flagThresholdsSchema,
};

/** Adds an issue at `estimatorParams.<key>` for each override that the estimator does not take or allow. */
export function checkEstimatorParams(estimator: EstimatorName, params: unknown, context: z.RefinementCtx): void {
  const result = estimatorOverridesSchema(estimator).safeParse(params);
  if (result.success) return;
  for (const issue of result.error.issues) {
    const { path, unknownKeys } = issueField(issue);
    const message = unknownKeys.length > 0 ? `is not a parameter of ${estimator}` : issue.message;
    context.addIssue({ code: 'custom', path: ['estimatorParams', ...path], message });
  }
}

/** The complete processing settings of a saved project: what the worker reads. */
export const projectSettingsSchema = z
  .strictObject(settingsFields)
  .superRefine((settings, context) => checkEstimatorParams(settings.estimator, settings.estimatorParams, context));
export type ProjectSettings = z.infer<typeof projectSettingsSchema>;

/** What is wrong with an estimator's complete parameters, as "dis patchSize must be …, got 1"; null when nothing. */
export function estimatorParamsProblem(estimator: EstimatorName, params: object): string | null {
  const result = ESTIMATOR_PARAM_SCHEMAS[estimator].safeParse(params);
  if (result.success) return null;
  const issue = result.error.issues[0]!;
  const { path, unknownKeys } = issueField(issue);
  const field = path.join('.');
  const value = (params as Record<string, unknown>)[field];
  const message = unknownKeys.length > 0 ? `is not a parameter of ${estimator}` : issue.message;
  return `${estimator} ${field} ${message}, got ${String(value)}`;
}
