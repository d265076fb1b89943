import { Op, literal, type FindOptions, type Order, type Sequelize, type WhereOptions } from 'sequelize';
import type { ListPage } from '../../../shared/api-types';
import { UNREVIEWED_STATES } from '../../../shared/clip-states';
import { HttpStatus } from '../../../shared/http-status';
import type { ClipListQuery, ClipPatch } from '../../../shared/schemas/clips';
import type { ClipDetail, ClipSummary } from '../../../shared/types/clips';
import { reusedCount } from '../db/count-cache';
import { AppError, notFound } from '../errors';
import { AuditEvent, Clip, Project, User, Verdict } from '../models';
import type { ObjectStore, StoredRef } from '../storage/object-store';
import { objectKeys } from '../storage/paths';
import { recordAudit } from '../audit/audit';
import { claimOf } from '../review/review-claims';
import { verdictHistory } from '../review/review-history';
import { containsText } from '../db/text-search';
import { jsonArrayHasAny } from '../db/dialect';
import type { Viewer } from '../people/viewer';
import { readClipPage } from './clip-page';

const INCLUDE = [
  { model: Project, as: 'project', attributes: ['id', 'name'] },
  { model: User, as: 'uploader', attributes: ['id', 'name'] },
  // Operators see the verdict in force on their clips, with its reason and comment.
  { model: Verdict, as: 'verdict', include: [{ model: User, as: 'curator', attributes: ['id', 'name'] }] },
];

export async function listClips(query: ClipListQuery): Promise<ListPage<ClipSummary>> {
  const sequelize = Clip.sequelize!;
  const conditions: WhereOptions<Clip>[] = [];
  if (query.projectId) conditions.push({ projectId: query.projectId });
  if (query.state) conditions.push({ state: query.state });
  if (query.uploaderId) conditions.push({ uploaderId: query.uploaderId });
  if (query.site) conditions.push({ site: query.site });
  if (query.capturedFrom) conditions.push({ capturedAt: { [Op.gte]: new Date(query.capturedFrom) } });
  if (query.capturedTo) conditions.push({ capturedAt: { [Op.lte]: new Date(query.capturedTo) } });
  if (query.tag) {
    conditions.push(
      literal(
        jsonArrayHasAny(sequelize, '"Clip"."tags"', sequelize.escape(query.tag.toLowerCase())),
      ) as unknown as WhereOptions<Clip>,
    );
  }
  if (query.q) conditions.push(containsText<Clip>(sequelize, ['Clip.originalName', 'Clip.notes'], query.q));
  const field = query.sort ? query.sort.replace(/^-/, '') : 'createdAt';
  const direction = query.sort && !query.sort.startsWith('-') ? 'ASC' : 'DESC';
  const order: Order = [
    [field, direction],
    ['id', 'DESC'],
  ];
  const where = { [Op.and]: conditions };
  // The page is chosen and counted on clips alone (indexes apply), and only its rows are joined to their project,
  // uploader and verdict: joining first made SQLite sort and count the whole joined table on every request.
  const chosen = queryGenerator(sequelize)
    .selectQuery(
      Clip.getTableName() as string,
      { attributes: ['id'], where, order, limit: query.pageSize, offset: (query.page - 1) * query.pageSize },
      Clip,
    )
    .replace(/;\s*$/, '');
  const [items, count] = await Promise.all([
    // The sort field is one of CLIP_SORT_FIELDS (the query schema), so it goes into the statement as it is.
    readClipPage(chosen, `c."${field}" ${direction}, c.id DESC`),
    // The filter is all of the query but its page and order.
    reusedCount(`clips ${JSON.stringify({ ...query, page: 0, pageSize: 0, sort: '' })}`, () => Clip.count({ where })),
  ]);
  return { items, total: count, page: query.page, pageSize: query.pageSize };
}

/** The part of Sequelize's query generator used to write the list's choice of clips as SQL (untyped in v6). */
interface SelectQueryGenerator {
  selectQuery(table: string, options: FindOptions<Clip>, model: typeof Clip): string;
}

function queryGenerator(sequelize: Sequelize): SelectQueryGenerator {
  return sequelize.getQueryInterface().queryGenerator as SelectQueryGenerator;
}

export async function findClip(id: number): Promise<Clip> {
  const clip = await Clip.findByPk(id, { include: INCLUDE });
  if (!clip) throw notFound(`Clip ${id}`);
  return clip;
}

function permissions(clip: Clip, viewer: Viewer): ClipDetail['can'] {
  const isAdmin = viewer.role === 'admin';
  const ownUnreviewed = clip.uploaderId === viewer.id && UNREVIEWED_STATES.includes(clip.state);
  return { edit: isAdmin || ownUnreviewed, withdraw: ownUnreviewed, delete: isAdmin };
}

export async function getClipDetail(id: number, viewer: Viewer): Promise<ClipDetail> {
  const clip = await findClip(id);
  const events = await AuditEvent.findAll({
    where: { targetType: 'clip', targetId: String(id) },
    include: [{ model: User, as: 'actor', attributes: ['name'] }],
    order: [
      ['at', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  return {
    ...clip.toApi(),
    history: events.map((event) => ({
      at: event.at.toISOString(),
      action: event.action,
      actorName: (event.get('actor') as User | null)?.name ?? null,
      detail: event.detail,
    })),
    verdicts: await verdictHistory(id),
    claim: await claimOf(clip),
    can: permissions(clip, viewer),
  };
}

export async function updateClipMetadata(id: number, patch: ClipPatch, viewer: Viewer): Promise<ClipDetail> {
  const clip = await findClip(id);
  if (!permissions(clip, viewer).edit) {
    throw new AppError(
      HttpStatus.FORBIDDEN,
      'forbidden',
      'Only the uploader (until the clip is reviewed) or an admin can edit its capture metadata.',
    );
  }
  await Clip.sequelize!.transaction(async (transaction) => {
    await clip.update(
      {
        ...patch,
        capturedAt:
          patch.capturedAt === undefined ? clip.capturedAt : patch.capturedAt ? new Date(patch.capturedAt) : null,
      },
      { transaction },
    );
    await recordAudit(
      {
        actorId: viewer.id,
        action: 'clip.edit',
        targetType: 'clip',
        targetId: id,
        detail: { changed: Object.keys(patch) },
      },
      transaction,
    );
  });
  return getClipDetail(id, viewer);
}

/**
 * Withdraws (uploader, before review) or deletes (admin) a clip: its rows go in one transaction, then its folder.
 * The audit event outlives the clip, so the trail still says who removed what.
 */
export async function removeClip(id: number, viewer: Viewer, store: ObjectStore): Promise<void> {
  const clip = await findClip(id);
  const can = permissions(clip, viewer);
  if (!can.delete && !can.withdraw) {
    throw new AppError(
      HttpStatus.FORBIDDEN,
      'forbidden',
      clip.uploaderId === viewer.id
        ? 'This clip has been reviewed; only an admin can delete it now.'
        : 'Only the uploader (before review) or an admin can remove this clip.',
    );
  }
  await Clip.sequelize!.transaction(async (transaction) => {
    await recordAudit(
      {
        actorId: viewer.id,
        action: can.delete ? 'clip.delete' : 'clip.withdraw',
        targetType: 'clip',
        targetId: id,
        detail: { originalName: clip.originalName, storedBytes: Number(clip.storedBytes), projectId: clip.projectId },
      },
      transaction,
    );
    await clip.destroy({ transaction });
  });
  await store.delete(objectKeys.clipDir(id));
}

/** The stored source file of a clip, for streaming with Range support. */
export async function clipSourceObject(id: number): Promise<StoredRef> {
  const clip = await findClip(id);
  if (clip.purgedAt) {
    throw new AppError(HttpStatus.GONE, 'purged', `Clip ${id}'s footage was purged on ${clip.purgedAt.toISOString()}.`);
  }
  return { key: objectKeys.clipSource(id, clip.sourceExt), what: `The source of clip ${id}` };
}
