import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { ListPage } from '../../../shared/api-types';
import { FLAG_NAMES, type FlagName } from '../../../shared/flag-thresholds';
import type { ReviewFilter, ReviewQueueQuery, ReviewSortField } from '../../../shared/schemas/review';
import type { ReviewFacets, ReviewQueueItem } from '../../../shared/types/review';
import { reusedCount } from '../db/count-cache';
import { indexedBy, orderTerm } from '../db/dialect';
import { Clip } from '../models';

/**
 * The review queue: `awaiting_review` clips, filtered and sorted by signals, paged on the server. Plain SQL that
 * names its indexes (migration 0006-review), so the plan cannot drift with the data: the page walks the covering
 * index of its sort key in order, judging every filter from the index entry, and stops after pageSize matches; the
 * total reads the covering index that leads with the most selective filter given. Flag filters become the list of
 * flag masks that pass (at most 256 values of the `flagMask` column, bit i = FLAG_NAMES[i]), which an index seeks.
 */

export const SORT_KEYS: Record<ReviewSortField, string> = {
  createdAt: 'createdAt',
  capturedAt: 'capturedAt',
  durationS: 'durationS',
  medianSharpness: 'medianSharpness',
  meanLuma: 'meanLuma',
  meanMotion: 'meanMotion',
  consistentShare: 'consistentShare',
  cutCount: 'cutCount',
  usablePairs: 'usablePairs',
  flagCount: 'flagCount',
};

/** Oldest first: clips that have waited longest come up first unless the curator sorts otherwise. */
export const DEFAULT_SORT = 'createdAt';
const ALL_MASKS = 2 ** FLAG_NAMES.length;

export function flagBits(flags: readonly FlagName[]): number {
  return flags.reduce((mask, flag) => mask | (1 << FLAG_NAMES.indexOf(flag)), 0);
}

/** The flag masks a filter lets through; null when it lets every mask through. */
export function passingMasks(filter: Pick<ReviewFilter, 'hasFlag' | 'lacksFlag' | 'flagged'>): number[] | null {
  const has = flagBits(filter.hasFlag ?? []);
  const lacks = flagBits(filter.lacksFlag ?? []);
  if (has === 0 && lacks === 0 && !filter.flagged) return null;
  const masks: number[] = [];
  for (let mask = 0; mask < ALL_MASKS; mask += 1) {
    const flagged = filter.flagged === undefined || (filter.flagged === 'true') === (mask !== 0);
    if ((mask & has) === has && (mask & lacks) === 0 && flagged) masks.push(mask);
  }
  return masks;
}

export interface QueueSql {
  page: string;
  count: string;
  replacements: Record<string, unknown>;
}

/** WHERE conditions (on table alias `c`) for a queue filter, with their replacements. */
export function filterConditions(filter: ReviewFilter, replacements: Record<string, unknown>): string[] {
  const conditions = ["c.state = 'awaiting_review'"];
  if (filter.projectId) {
    conditions.push('c."projectId" = :projectId');
    replacements.projectId = filter.projectId;
  }
  if (filter.uploaderId) {
    conditions.push('c."uploaderId" = :uploaderId');
    replacements.uploaderId = filter.uploaderId;
  }
  if (filter.site) {
    conditions.push('c.site = :site');
    replacements.site = filter.site;
  }
  if (filter.capturedFrom) {
    conditions.push('c."capturedAt" >= :capturedFrom');
    replacements.capturedFrom = new Date(filter.capturedFrom);
  }
  if (filter.capturedTo) {
    conditions.push('c."capturedAt" <= :capturedTo');
    replacements.capturedTo = new Date(filter.capturedTo);
  }
  const masks = passingMasks(filter);
  // Whole numbers computed here, never input, so they go into the statement as they are.
  if (masks) conditions.push(masks.length > 0 ? `c."flagMask" IN (${masks.join(', ')})` : '0 = 1');
  return conditions;
}

/** The covering index a total reads: the one leading with the most selective filter given. */
function countIndex(filter: ReviewFilter): string {
  if (filter.uploaderId) return 'clips_queue_uploaderId';
  if (filter.site) return 'clips_queue_site';
  if (filter.projectId) return 'clips_queue_projectId';
  if (filter.capturedFrom || filter.capturedTo) return 'clips_queue_by_capturedAt';
  return 'clips_queue_flags';
}

/** A queue row's columns and the joins they need, for the clips a subquery `chosen` picked (`:now` given). */
export const ITEM_COLUMNS = `c.id, c."originalName", c."projectId", p.name AS "projectName", c.site, c."uploaderId",
      u.name AS "uploaderName", c."durationS", c."capturedAt", c."createdAt", c."hasThumbnail", c.flags, c."frameCount",
      c."medianSharpness", c."meanLuma", c."meanMotion", c."consistentShare", c."cutCount", c."usablePairs",
      CASE WHEN c."claimExpiresAt" > :now THEN c."claimedBy" END AS "claimHolderId", h.name AS "claimHolderName",
      c."claimExpiresAt"`;
export const ITEM_JOINS = `JOIN clips c ON c.id = chosen.id
    JOIN projects p ON p.id = c."projectId"
    JOIN users u ON u.id = c."uploaderId"
    LEFT JOIN users h ON h.id = c."claimedBy" AND c."claimExpiresAt" > :now`;

/** The ORDER BY of a queue walk on sort column `key` of table alias `alias`, ties broken by id. */
export function queueOrder(sequelize: Sequelize, alias: string, key: string, direction: 'ASC' | 'DESC'): string {
  return `${orderTerm(sequelize, `${alias}."${key}"`, direction)}, ${alias}.id ${direction}`;
}

/** The page and count statements for a queue query (the benchmark times the same statements raw). */
export function queueSql(query: ReviewQueueQuery, now: Date, sequelize: Sequelize = Clip.sequelize!): QueueSql {
  const replacements: Record<string, unknown> = {
    now,
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  };
  const where = filterConditions(query, replacements).join(' AND ');
  const sort = query.sort ?? DEFAULT_SORT;
  const direction = sort.startsWith('-') ? 'DESC' : 'ASC';
  const key = SORT_KEYS[sort.replace(/^-/, '') as ReviewSortField];
  const order = queueOrder(sequelize, 'c', key, direction);
  const page = `
    SELECT ${ITEM_COLUMNS}
    FROM (SELECT c.id FROM clips c ${indexedBy(sequelize, `clips_queue_by_${key}`)} WHERE ${where}
          ORDER BY ${order} LIMIT :limit OFFSET :offset) chosen
    ${ITEM_JOINS}
    ORDER BY ${order}`;
  const count = `SELECT COUNT(*) AS total FROM clips c ${indexedBy(sequelize, countIndex(query))} WHERE ${where}`;
  return { page, count, replacements };
}

/**
 * A queue row as the database answers it: the item's fields, with the stored forms of those the API reshapes.
 * SQLite gives 0/1, JSON text and dates as text; PostgreSQL gives booleans, parsed JSON and Date objects.
 */
export type QueueRow = Omit<ReviewQueueItem, 'hasThumbnail' | 'flags' | 'claim' | 'capturedAt' | 'createdAt'> & {
  capturedAt: string | Date | null;
  createdAt: string | Date;
  hasThumbnail: number | boolean;
  /** Flag names, or the JSON text of them. */
  flags: string | FlagName[];
  claimHolderId: number | null;
  claimHolderName: string | null;
  claimExpiresAt: string | Date | null;
};

const iso = (stored: string | Date) => new Date(stored).toISOString();

export function toItem(row: QueueRow): ReviewQueueItem {
  const { claimHolderId, claimHolderName, claimExpiresAt, ...fields } = row;
  return {
    ...fields,
    capturedAt: row.capturedAt ? iso(row.capturedAt) : null,
    createdAt: iso(row.createdAt),
    hasThumbnail: Boolean(row.hasThumbnail),
    flags: typeof row.flags === 'string' ? (JSON.parse(row.flags) as FlagName[]) : row.flags,
    claim:
      claimHolderId === null
        ? null
        : {
            holderId: claimHolderId,
            holderName: claimHolderName ?? 'a former user',
            expiresAt: iso(claimExpiresAt!),
          },
  };
}

export async function listReviewQueue(query: ReviewQueueQuery, now = new Date()): Promise<ListPage<ReviewQueueItem>> {
  const sql = queueSql(query, now);
  const sequelize = Clip.sequelize!;
  const countValues = Object.entries(sql.replacements).filter(([name]) => sql.count.includes(`:${name}`));
  const [rows, total] = await Promise.all([
    sequelize.query<QueueRow>(sql.page, { replacements: sql.replacements, type: QueryTypes.SELECT }),
    reusedCount(
      `${sql.count} ${JSON.stringify(countValues)}`,
      async () =>
        (
          await sequelize.query<{ total: number }>(sql.count, {
            replacements: sql.replacements,
            type: QueryTypes.SELECT,
          })
        )[0]?.total ?? 0,
    ),
  ]);
  return { items: rows.map(toItem), total, page: query.page, pageSize: query.pageSize };
}

/** Ids of the queue's clips matching a filter, at most `limit`, for a bulk action (in its transaction). */
export async function matchingClipIds(
  filter: ReviewFilter,
  limit: number,
  transaction: Transaction,
): Promise<number[]> {
  const replacements: Record<string, unknown> = { limit };
  const where = filterConditions(filter, replacements).join(' AND ');
  const rows = await Clip.sequelize!.query<{ id: number }>(
    `SELECT c.id FROM clips c ${indexedBy(Clip.sequelize!, countIndex(filter))} WHERE ${where} ORDER BY c.id LIMIT :limit`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  return rows.map((row) => row.id);
}

/** Who uploaded and where the queue's clips were shot, with counts, for the filter lists of the queue screen. */
export async function reviewFacets(): Promise<ReviewFacets> {
  const sequelize = Clip.sequelize!;
  const [uploaders, sites] = await Promise.all([
    sequelize.query<{ id: number; name: string; count: number }>(
      `SELECT c."uploaderId" AS id, u.name AS name, c.count AS count
       FROM (SELECT "uploaderId", COUNT(*) AS count FROM clips WHERE state = 'awaiting_review' GROUP BY "uploaderId") c
       JOIN users u ON u.id = c."uploaderId" ORDER BY u.name`,
      { type: QueryTypes.SELECT },
    ),
    sequelize.query<{ site: string; count: number }>(
      `SELECT site, COUNT(*) AS count FROM clips WHERE state = 'awaiting_review' AND site <> ''
       GROUP BY site ORDER BY site`,
      { type: QueryTypes.SELECT },
    ),
  ]);
  return { uploaders, sites };
}
