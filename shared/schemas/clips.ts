import { z } from 'zod';
import { CLIP_STATES } from '../clip-states';
import { listQuerySchema } from './list-query';

export const MAX_TAGS = 50;
export const MAX_TAG_LENGTH = 60;

/** ISO 8601 with a time zone (`Z` or an offset): a capture time without one is ambiguous across field sites. */
const isoWithZone = z.iso.datetime({ offset: true, message: 'capturedAt must be an ISO 8601 time with a time zone' });

const tagList = z
  .array(z.string().trim().min(1).max(MAX_TAG_LENGTH, `each tag must be at most ${MAX_TAG_LENGTH} characters`))
  .max(MAX_TAGS, `at most ${MAX_TAGS} tags`)
  .transform((tags) => [...new Set(tags.map((tag) => tag.toLowerCase()))]);

/** Capture metadata as multipart text fields on upload: tags come comma-separated. */
export const uploadFieldsSchema = z.strictObject({
  projectId: z.coerce
    .number({ message: 'projectId must be a number' })
    .int()
    .positive('projectId must be a positive number'),
  site: z.string().trim().max(200).default(''),
  rig: z.string().trim().max(200).default(''),
  capturedAt: z
    .union([z.literal(''), isoWithZone])
    .default('')
    .transform((value) => value || null),
  tags: z
    .string()
    .max(MAX_TAGS * (MAX_TAG_LENGTH + 1))
    .default('')
    .transform((value) =>
      value
        .split(',')
        .map((tag) => tag.trim())
        .filter(Boolean),
    )
    .pipe(tagList),
  notes: z.string().max(4000).default(''),
});
export type UploadFields = z.infer<typeof uploadFieldsSchema>;

/** Editing a clip's capture metadata (JSON). */
export const clipPatchSchema = z.strictObject({
  site: z.string().trim().max(200).optional(),
  rig: z.string().trim().max(200).optional(),
  capturedAt: isoWithZone.nullable().optional(),
  tags: tagList.optional(),
  notes: z.string().max(4000).optional(),
});
export type ClipPatch = z.infer<typeof clipPatchSchema>;

export const CLIP_SORT_FIELDS = [
  'createdAt',
  'capturedAt',
  'originalName',
  'sizeBytes',
  'durationS',
  'state',
  'site',
] as const;

export const clipListQuerySchema = listQuerySchema(CLIP_SORT_FIELDS).extend({
  projectId: z.coerce.number().int().positive().optional(),
  state: z.enum(CLIP_STATES).optional(),
  uploaderId: z.coerce.number().int().positive().optional(),
  site: z.string().trim().max(200).optional(),
  tag: z.string().trim().max(MAX_TAG_LENGTH).optional(),
  capturedFrom: isoWithZone.optional(),
  capturedTo: isoWithZone.optional(),
  q: z.string().trim().max(200).optional(),
});
export type ClipListQuery = z.infer<typeof clipListQuerySchema>;
