import { z } from 'zod';
import { pairKinds, viewNames, type ViewKind, type ViewName } from '../pairing/pairing-graph';
import { MAX_TAG_LENGTH } from './clips';
import { diversitySchema } from './diversity';
import { listQuerySchema } from './list-query';
import { pathNumber } from './path-number';

/** A pairset's life (DESIGN §2): a draft is built once; a built pairset never changes. */
export const PAIRSET_STATES = ['draft', 'building', 'built', 'failed', 'cancelled'] as const;
export type PairsetState = (typeof PAIRSET_STATES)[number];

/** The views a definition may choose per moment (DESIGN §2), in the form's order. */
export const PAIRSET_VIEW_KINDS = ['frame', 'neighbour', 'motion', 'luma', 'chroma'] as const satisfies ViewKind[];
export const MOTION_FORMATS = ['flo', 'kitti-png'] as const;
export type MotionFormat = (typeof MOTION_FORMATS)[number];
export const PAIRING_GRAPHS = ['core', 'full'] as const;

/** Defaults a definition takes when a field is left out; stored filled in, so a rebuild never depends on them. */
export const PAIRSET_DEFAULTS = {
  motionFormat: 'flo' as MotionFormat,
  /** WebDataset-style shards of a few hundred MB stream well and stay few (common practice). */
  shardMB: 256,
  /** τ of Wu et al. 2018 and of the Contrastive Multiview Coding code. */
  temperature: 0.07,
} as const;

export const MAX_PAIRSET_DELTA = 30;
const MAX_LIST = 100;

const isoWithZone = (field: string) =>
  z.iso.datetime({ offset: true, message: `${field} must be an ISO 8601 time with a time zone` });
const uniqueList = <T extends z.ZodType>(item: T, what: string) =>
  z
    .array(item)
    .max(MAX_LIST)
    .refine((values) => new Set(values).size === values.length, `${what} must not repeat`);

const definitionShape = {
  name: z.string().trim().min(1, 'name is required').max(200),
  projectIds: uniqueList(z.number().int().positive(), 'projectIds').min(1, 'projectIds needs at least one project'),
  sites: uniqueList(z.string().trim().min(1).max(200), 'sites').optional(),
  tags: uniqueList(z.string().trim().toLowerCase().min(1).max(MAX_TAG_LENGTH), 'tags').optional(),
  capturedFrom: isoWithZone('capturedFrom').optional(),
  capturedTo: isoWithZone('capturedTo').optional(),
  views: uniqueList(z.enum(PAIRSET_VIEW_KINDS), 'views').min(1, 'views needs at least one view'),
  deltas: uniqueList(z.number().int().min(1).max(MAX_PAIRSET_DELTA), 'deltas').default([]),
  graph: z.enum(PAIRING_GRAPHS),
  coreView: z.string().max(40).optional(),
  minMeanMotion: z.number().min(0, 'minMeanMotion must be 0 or more px').max(1000).optional(),
  minConsistentShare: z.number().min(0, 'minConsistentShare must be within 0..1').max(1).optional(),
  /** Longest side of every stored view in px; left out, views keep the project's working size. */
  outputSize: z.number().int().min(16, 'outputSize must be at least 16 px').max(4096).optional(),
  motionFormat: z.enum(MOTION_FORMATS).default(PAIRSET_DEFAULTS.motionFormat),
  split: z.strictObject({
    val: z.number().min(0, 'split.val must be within 0..1').max(1, 'split.val must be within 0..1'),
    seed: z
      .number()
      .int()
      .min(0)
      .max(2 ** 32 - 1),
  }),
  shardMB: z.number().min(0.05, 'shardMB must be at least 0.05').max(4096).default(PAIRSET_DEFAULTS.shardMB),
  /** τ of the pair-difficulty report. */
  temperature: z.number().gt(0, 'temperature must be more than 0').max(10).default(PAIRSET_DEFAULTS.temperature),
  /** Cluster balance, pair.json's cluster and a cluster-mixed order; left out, none of these. */
  diversity: diversitySchema.optional(),
};

interface CheckedFields {
  views: ViewKind[];
  deltas: number[];
  graph: 'core' | 'full';
  coreView?: string;
  capturedFrom?: string;
  capturedTo?: string;
}

/** Checks across fields: enough views for a pair, Δ with the neighbour view, a core view among the views. */
function checkDefinition(value: CheckedFields, context: z.RefinementCtx): void {
  const issue = (path: string, message: string) => context.addIssue({ code: 'custom', path: [path], message });
  if (value.views.includes('neighbour') && value.deltas.length === 0) {
    issue('deltas', 'deltas needs at least one Δ when the neighbour view is chosen');
    return;
  }
  const names = viewNames(value.views, value.views.includes('neighbour') ? value.deltas : []);
  if (names.length < 2) issue('views', 'views must give at least two views per moment to make a pair');
  if (value.coreView !== undefined) {
    if (value.graph !== 'core') issue('coreView', 'coreView applies only to the core graph');
    else if (!names.includes(value.coreView as ViewName)) {
      issue('coreView', `coreView must be one of the chosen views: ${names.join(', ')}`);
    }
  }
  if (value.capturedFrom && value.capturedTo && Date.parse(value.capturedFrom) > Date.parse(value.capturedTo)) {
    issue('capturedTo', 'capturedTo must not be before capturedFrom');
  }
}

/** `POST /api/pairsets`: a pairset definition. Unknown fields are refused. */
export const pairsetDefinitionSchema = z.strictObject(definitionShape).superRefine(checkDefinition);
export type PairsetDefinition = z.infer<typeof pairsetDefinitionSchema>;

/** `POST /api/pairsets/preview`: the same body; the name may still be empty while the form is filled in. */
export const pairsetPreviewSchema = z
  .strictObject({ ...definitionShape, name: definitionShape.name.optional() })
  .superRefine(checkDefinition);
export type PairsetPreviewBody = z.infer<typeof pairsetPreviewSchema>;

/** The views of one moment and the view pairs of a (valid) definition. */
export function definitionViews(definition: Pick<PairsetDefinition, 'views' | 'deltas' | 'graph' | 'coreView'>) {
  const views = viewNames(definition.views, definition.views.includes('neighbour') ? definition.deltas : []);
  return { views, pairs: pairKinds(views, definition.graph, definition.coreView as ViewName | undefined) };
}

export const PAIRSET_SORT_FIELDS = ['name', 'createdAt', 'builtAt', 'state', 'bytes'] as const;

export const pairsetListQuerySchema = listQuerySchema(PAIRSET_SORT_FIELDS).extend({
  state: z.enum(PAIRSET_STATES).optional(),
  q: z.string().trim().max(200).optional(),
});
export type PairsetListQuery = z.infer<typeof pairsetListQuerySchema>;

/** `/:id/shards/:index`: the shard's place in the pairset's one sequence, from 0. */
export const shardParamSchema = z.strictObject({
  id: pathNumber('id', { min: 1 }),
  index: pathNumber('index', { min: 0 }),
});
export type ShardParam = z.infer<typeof shardParamSchema>;
