import { z } from 'zod';
import { DEFAULT_ESTIMATOR } from '../estimators';
import { listQuerySchema } from './list-query';
import { checkEstimatorParams, settingsFields as settingsShape } from './project-settings';

const quotaBytes = z
  .number()
  .int()
  .min(0, 'quotaBytes must be 0 or more bytes')
  .max(2 ** 53 - 1)
  .nullable();

const projectFields = z.strictObject({
  name: z.string().trim().min(1, 'name is required').max(200),
  description: z.string().max(4000).optional(),
  quotaBytes: quotaBytes.optional(),
  archived: z.boolean().optional(),
  retentionDays: z.number().int().min(1, 'retentionDays must be at least 1 day').max(3650).nullable().optional(),
  sampleFps: settingsShape.sampleFps.optional(),
  workingSize: settingsShape.workingSize.optional(),
  deltas: settingsShape.deltas.optional(),
  estimator: settingsShape.estimator.optional(),
  estimatorParams: settingsShape.estimatorParams.optional(),
  flagThresholds: settingsShape.flagThresholds.optional(),
});

/** A new project: its estimator parameters must belong to its estimator (the default one when not chosen). */
export const projectBodySchema = projectFields.superRefine((body, context) => {
  if (body.estimatorParams) checkEstimatorParams(body.estimator ?? DEFAULT_ESTIMATOR, body.estimatorParams, context);
});
export type ProjectBody = z.infer<typeof projectBodySchema>;

/** A change of some fields; the service checks the project's settings as a whole once the change is applied. */
export const projectPatchSchema = projectFields.partial();
export type ProjectPatch = z.infer<typeof projectPatchSchema>;

export const projectListQuerySchema = listQuerySchema(['name', 'createdAt']).extend({
  archived: z.enum(['true', 'false']).optional(),
});
export type ProjectListQuery = z.infer<typeof projectListQuerySchema>;
