import { z } from 'zod';
import { ESTIMATORS } from '../estimators';
import { listQuerySchema } from './list-query';

export const MAX_DELTA = 30;
const quotaBytes = z.number().int().min(0, 'quotaBytes must be 0 or more bytes').max(2 ** 53 - 1).nullable();

const settingsShape = {
  sampleFps: z.number().min(0.5, 'sampleFps must be at least 0.5 frames/s').max(30, 'sampleFps must be at most 30'),
  workingSize: z.number().int().min(64, 'workingSize must be at least 64 px').max(1920, 'workingSize must be at most 1920 px'),
  deltas: z.array(z.number().int().min(1).max(MAX_DELTA)).min(1, 'deltas needs at least one offset').max(8)
    .refine((values) => new Set(values).size === values.length, 'deltas must not repeat'),
  estimator: z.enum(ESTIMATORS),
  estimatorParams: z.record(z.string(), z.union([z.number(), z.string(), z.boolean()])),
  flagThresholds: z.record(z.string(), z.number().min(0)),
};

export const projectBodySchema = z.strictObject({
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
export type ProjectBody = z.infer<typeof projectBodySchema>;

export const projectPatchSchema = projectBodySchema.partial();
export type ProjectPatch = z.infer<typeof projectPatchSchema>;

export const projectListQuerySchema = listQuerySchema(['name', 'createdAt']).extend({
  archived: z.enum(['true', 'false']).optional(),
});
export type ProjectListQuery = z.infer<typeof projectListQuerySchema>;
