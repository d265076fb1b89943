import { z } from 'zod';
import { pathNumber } from './path-number';

export const MIN_CLUSTERS = 2;
export const MAX_CLUSTERS = 50;
/** Candidate k the silhouette chooses from when the engineer leaves k out. */
export const SUGGESTED_K_RANGE = { from: 2, to: 12 } as const;
export const DEFAULT_RESTARTS = 4;

/** `POST /api/clusterings`: cluster the moments of these projects, with k or with k suggested. */
export const clusteringCreateSchema = z.strictObject({
  projectIds: z
    .array(z.number().int().positive())
    .min(1, 'projectIds needs at least one project')
    .max(100)
    .refine((ids) => new Set(ids).size === ids.length, 'projectIds must not repeat'),
  k: z
    .number()
    .int()
    .min(MIN_CLUSTERS, `k must be within ${MIN_CLUSTERS}..${MAX_CLUSTERS}`)
    .max(MAX_CLUSTERS, `k must be within ${MIN_CLUSTERS}..${MAX_CLUSTERS}`)
    .optional(),
  seed: z
    .number()
    .int()
    .min(0)
    .max(2 ** 32 - 1)
    .default(1),
  restarts: z
    .number()
    .int()
    .min(1, 'restarts must be within 1..20')
    .max(20, 'restarts must be within 1..20')
    .default(DEFAULT_RESTARTS),
});
export type ClusteringCreateBody = z.infer<typeof clusteringCreateSchema>;

export const clusteringListQuerySchema = z.strictObject({
  projectId: pathNumber('projectId', { min: 1 }).optional(),
});
export type ClusteringListQuery = z.infer<typeof clusteringListQuerySchema>;

/**
 * A pairset's diversity options: the clustering whose clusters it balances and records in pair.json, a cap on
 * the moments any one cluster gives (a count, or a share of the balanced moments), and an order of pairs within
 * each split that takes clusters in turn, so neighbouring pairs (a trainer's batch) come from different scenes.
 */
export const diversitySchema = z
  .strictObject({
    clusteringId: z.number().int().positive(),
    capMoments: z.number().int().min(1, 'capMoments must be at least 1').max(10_000_000).optional(),
    capShare: z.number().gt(0, 'capShare must be within 0..1').max(1, 'capShare must be within 0..1').optional(),
    mixClusters: z.boolean().default(false),
  })
  .refine((value) => value.capMoments === undefined || value.capShare === undefined, {
    message: 'give capMoments or capShare, not both',
    path: ['capShare'],
  });
export type DiversityOptions = z.infer<typeof diversitySchema>;
