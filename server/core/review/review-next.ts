import { QueryTypes } from 'sequelize';
import type { ReviewSortField } from '../../../shared/schemas/review';
import type { ReviewNextQuery } from '../../../shared/schemas/review-flow';
import type { ReviewQueueItem } from '../../../shared/types/review';
import { indexedBy } from '../db/dialect';
import { notFound } from '../errors';
import { Clip } from '../models';
import type { Viewer } from '../people/viewer';
import {
  DEFAULT_SORT,
  filterConditions,
  ITEM_COLUMNS,
  ITEM_JOINS,
  queueOrder,
  SORT_KEYS,
  toItem,
  type QueueRow,
} from './review-queue';

/**
 * What comes after a clip in the queue, under the curator's filter and order: the clips whose (sort key, id)
 * follows the anchor's, so "next" is the next row of the list the curator works in even once the anchor has been
 * decided and left the queue. Clips someone else holds are passed over. The walk is the queue's own: the covering
 * index of the sort key, sought from the anchor's key (a keyset, not an offset), stopping after `limit` clips.
 * NULL comes first going up and last going down (SQLite's rule, asked of PostgreSQL too), and so in the keyset below.
 */
export async function clipsAfter(query: ReviewNextQuery, viewer: Viewer, now = new Date()): Promise<ReviewQueueItem[]> {
  const sort = query.sort ?? DEFAULT_SORT;
  const descending = sort.startsWith('-');
  const key = SORT_KEYS[sort.replace(/^-/, '') as ReviewSortField];
  const sequelize = Clip.sequelize!;
  // The anchor's key as stored (dates are text in SQLite), so the comparison below is like with like.
  const [anchor] = await sequelize.query<{ k: unknown }>(`SELECT "${key}" AS k FROM clips WHERE id = :after`, {
    replacements: { after: query.after },
    type: QueryTypes.SELECT,
  });
  if (!anchor) throw notFound(`Clip ${query.after}`);

  const replacements: Record<string, unknown> = {
    now,
    after: query.after,
    k: anchor.k,
    limit: query.limit,
    viewerId: viewer.id,
  };
  const conditions = filterConditions(query, replacements);
  conditions.push(keyset(`c."${key}"`, anchor.k === null, descending));
  conditions.push(
    '(c."claimedBy" IS NULL OR c."claimedBy" = :viewerId OR c."claimExpiresAt" IS NULL OR c."claimExpiresAt" <= :now)',
  );
  const order = queueOrder(sequelize, 'c', key, descending ? 'DESC' : 'ASC');
  const rows = await sequelize.query<QueueRow>(
    `
    SELECT ${ITEM_COLUMNS}
    FROM (SELECT c.id FROM clips c ${indexedBy(sequelize, `clips_queue_by_${key}`)} WHERE ${conditions.join(' AND ')}
          ORDER BY ${order} LIMIT :limit) chosen
    ${ITEM_JOINS}
    ORDER BY ${order}`,
    { replacements, type: QueryTypes.SELECT },
  );
  return rows.map(toItem);
}

/** Rows after the anchor (key :k, id :after) in the order (key, id), ascending or descending. */
function keyset(column: string, anchorNull: boolean, descending: boolean): string {
  if (!descending) {
    return anchorNull
      ? `(${column} IS NOT NULL OR c.id > :after)`
      : `(${column} > :k OR (${column} = :k AND c.id > :after))`;
  }
  return anchorNull
    ? `(${column} IS NULL AND c.id < :after)`
    : `(${column} < :k OR (${column} = :k AND c.id < :after) OR ${column} IS NULL)`;
}
