import { literal, Op, type Order, type Transaction, type WhereOptions } from 'sequelize';
import type { ListPage } from '../../../shared/api-types';
import { formatBytes } from '../../../shared/format-bytes';
import { HttpStatus } from '../../../shared/http-status';
import {
  definitionViews,
  type PairsetDefinition,
  type PairsetListQuery,
  type PairsetState,
  type PairsetPreviewBody,
} from '../../../shared/schemas/pairsets';
import type { PairsetDetail, PairsetDifficulty, PairsetPreview, PairsetSummary } from '../../../shared/types/pairsets';
import { AppError, conflict, notFound } from '../errors';
import { Job, Pairset, Project, Shard, User } from '../models';
import type { ObjectStore, StoredRef } from '../storage/object-store';
import { objectKeys } from '../storage/paths';
import { recordAudit } from '../audit/audit';
import { loadPairsetSources } from './pairset-sources';
import { planDefinition } from './pairset-plan';
import { planCounts } from './pairset-statistics';
import { userUsage } from '../usage/quotas';
import { enqueueJob } from '../jobs/enqueue';

/**
 * Pairsets: definitions, builds (queued for the worker's build-pairset job), versions and their files. Everyone
 * with the engineer role sees and downloads every pairset; building, cancelling and deleting belong to the
 * pairset's owner (and admins), since its bytes count against the owner's quota.
 */

const SHARD_COUNT = literal('(SELECT COUNT(*) FROM shards WHERE shards."pairsetId" = "Pairset".id)');
const OWNER = { model: User, as: 'owner', attributes: ['id', 'name'] };
const REBUILDABLE: readonly PairsetState[] = ['draft', 'failed', 'cancelled'];

/** The counts a definition would give, for the form, before anything is built. */
export async function previewPairset(body: PairsetPreviewBody): Promise<PairsetPreview> {
  const sources = await loadPairsetSources(body);
  const { views, pairs } = definitionViews(body);
  const { planned, balance } = await planDefinition(body, sources, pairs);
  return { views, ...planCounts(planned, pairs, sources), ...(balance ? { clusters: balance } : {}) };
}

export async function createPairset(definition: PairsetDefinition, actorId: number): Promise<PairsetDetail> {
  await assertProjectsExist(definition.projectIds);
  const id = await Pairset.sequelize!.transaction(async (transaction) => {
    const existing = await Pairset.findOne({ where: { name: definition.name }, transaction });
    if (existing) {
      throw conflict(
        'pairset_name_taken',
        `A pairset named "${definition.name}" exists; make a new version of it instead.`,
        { pairsetId: existing.id },
      );
    }
    return draft(definition, 1, actorId, 'pairset.create', transaction);
  });
  return getPairsetDetail(id);
}

/** A new draft with the definition of pairset `id` and the next version number of its name. */
export async function newPairsetVersion(id: number, actorId: number): Promise<PairsetDetail> {
  const newId = await Pairset.sequelize!.transaction(async (transaction) => {
    const source = await existingPairset(id, transaction);
    const latest = (await Pairset.max<number, Pairset>('version', { where: { name: source.name }, transaction })) ?? 0;
    return draft(source.definition, latest + 1, actorId, 'pairset.new-version', transaction, { fromId: id });
  });
  return getPairsetDetail(newId);
}

async function draft(
  definition: PairsetDefinition,
  version: number,
  actorId: number,
  action: string,
  transaction: Transaction,
  detail: Record<string, unknown> = {},
): Promise<number> {
  const created = await Pairset.create(
    {
      name: definition.name,
      version,
      definition,
      state: 'draft',
      ownerId: actorId,
      seed: definition.split.seed,
    },
    { transaction },
  );
  await recordAudit(
    {
      actorId,
      action,
      targetType: 'pairset',
      targetId: created.id,
      detail: { name: definition.name, version, ...detail },
    },
    transaction,
  );
  return created.id;
}

export async function listPairsets(query: PairsetListQuery): Promise<ListPage<PairsetSummary>> {
  const order: Order = query.sort
    ? [
        [query.sort.replace(/^-/, ''), query.sort.startsWith('-') ? 'DESC' : 'ASC'],
        ['id', 'DESC'],
      ]
    : [
        ['createdAt', 'DESC'],
        ['id', 'DESC'],
      ];
  const where: WhereOptions<Pairset> = {};
  if (query.state) where.state = query.state;
  if (query.q) where.name = { [Op.like]: `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` };
  const { rows, count } = await Pairset.findAndCountAll({
    where,
    order,
    include: [OWNER],
    attributes: { include: [[SHARD_COUNT, 'shardCount']] },
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
    distinct: true,
  });
  return { items: rows.map((row) => row.toApi()), total: count, page: query.page, pageSize: query.pageSize };
}

export async function getPairsetDetail(id: number): Promise<PairsetDetail> {
  const pairset = await Pairset.findByPk(id, {
    include: [OWNER],
    attributes: { include: [[SHARD_COUNT, 'shardCount']] },
  });
  if (!pairset) throw notFound(`Pairset ${id}`);
  const shards = await Shard.findAll({ where: { pairsetId: id }, order: [['index', 'ASC']] });
  return {
    ...pairset.toApi(),
    definition: pairset.definition,
    stats: pairset.stats,
    shards: shards.map((shard) => shard.toApi()),
    hasDifficulty: pairset.difficulty !== null,
  };
}

/**
 * Queues the build of a draft (or of a build that failed or was cancelled). A built pairset never changes. The
 * owner must have quota left, because the bytes it will hold count against them.
 */
export async function startBuild(id: number, actor: User): Promise<PairsetDetail> {
  await Pairset.sequelize!.transaction(async (transaction) => {
    const pairset = await ownedPairset(id, actor, transaction);
    if (pairset.state === 'built') {
      throw conflict('pairset_built', `Pairset ${id} is built and never changes; make a new version to build again.`);
    }
    if (!REBUILDABLE.includes(pairset.state)) {
      throw conflict('build_running', `Pairset ${id} is being built already.`);
    }
    const active = await Job.findOne({
      where: { pairsetId: id, kind: 'build-pairset', state: { [Op.in]: ['queued', 'running'] } },
      transaction,
    });
    // A cancelled build stops at its next pair; until it has, a new build would race it for the same folder.
    if (active) {
      throw conflict('build_stopping', `The last build of pairset ${id} is still stopping; try again shortly.`);
    }
    await assertQuotaLeft(pairset.ownerId, transaction);
    await pairset.update(
      {
        state: 'building',
        progress: 0,
        error: null,
        stats: null,
        difficulty: null,
        bytes: 0,
        builtAt: null,
      },
      { transaction },
    );
    await enqueueJob('build-pairset', { pairsetId: id }, { transaction });
    await recordAudit(
      {
        actorId: actor.id,
        action: 'pairset.build',
        targetType: 'pairset',
        targetId: id,
        detail: { previousState: pairset.state },
      },
      transaction,
    );
  });
  return getPairsetDetail(id);
}

/** Cancels a build: a queued job never starts; a running one stops between pairs and removes what it wrote. */
export async function cancelBuild(id: number, actor: User): Promise<PairsetDetail> {
  await Pairset.sequelize!.transaction(async (transaction) => {
    const pairset = await ownedPairset(id, actor, transaction);
    if (pairset.state !== 'building') {
      throw conflict('not_building', `Pairset ${id} is ${pairset.state}; only a build in progress can be cancelled.`);
    }
    await pairset.update({ state: 'cancelled' }, { transaction });
    await Job.update(
      { state: 'cancelled', finishedAt: new Date() },
      { where: { pairsetId: id, kind: 'build-pairset', state: 'queued' }, transaction },
    );
    await recordAudit(
      { actorId: actor.id, action: 'pairset.cancel', targetType: 'pairset', targetId: id },
      transaction,
    );
  });
  return getPairsetDetail(id);
}

/** Deletes the pairset, its shard rows and files; its bytes leave the owner's usage with the row. */
export async function deletePairset(id: number, actor: User, store: ObjectStore): Promise<void> {
  await Pairset.sequelize!.transaction(async (transaction) => {
    const pairset = await ownedPairset(id, actor, transaction);
    if (pairset.state === 'building') {
      throw conflict('build_running', `Pairset ${id} is being built; cancel the build before deleting it.`);
    }
    await Shard.destroy({ where: { pairsetId: id }, transaction });
    await Job.update(
      { state: 'cancelled', finishedAt: new Date() },
      { where: { pairsetId: id, state: 'queued' }, transaction },
    );
    await pairset.destroy({ transaction });
    await recordAudit(
      {
        actorId: actor.id,
        action: 'pairset.delete',
        targetType: 'pairset',
        targetId: id,
        detail: { name: pairset.name, version: pairset.version, bytes: Number(pairset.bytes) },
      },
      transaction,
    );
  });
  await store.delete(objectKeys.pairsetDir(id));
}

/** pairset.json of a built pairset. */
export async function manifestObject(id: number): Promise<StoredRef> {
  await builtPairset(id);
  return { key: objectKeys.pairsetManifest(id), what: `pairset.json of pairset ${id}` };
}

/** The shard file at `index` of a built pairset, with the name a download should take. */
export async function shardFile(id: number, index: number): Promise<StoredRef & { file: string }> {
  await builtPairset(id);
  const shard = await Shard.findOne({ where: { pairsetId: id, index } });
  if (!shard) throw notFound(`Shard ${index} of pairset ${id}`);
  return {
    key: objectKeys.pairsetShard(id, shard.split, index),
    what: `Shard ${index} of pairset ${id}`,
    file: shard.fileName(),
  };
}

export async function pairsetDifficulty(id: number): Promise<PairsetDifficulty> {
  const pairset = await builtPairset(id);
  if (!pairset.difficulty) throw notFound(`The pair-difficulty report of pairset ${id}`);
  return pairset.difficulty;
}

async function existingPairset(id: number, transaction?: Transaction): Promise<Pairset> {
  const pairset = await Pairset.findByPk(id, { transaction });
  if (!pairset) throw notFound(`Pairset ${id}`);
  return pairset;
}

async function ownedPairset(id: number, actor: User, transaction: Transaction): Promise<Pairset> {
  const pairset = await existingPairset(id, transaction);
  if (pairset.ownerId !== actor.id && actor.role !== 'admin') {
    throw new AppError(
      HttpStatus.FORBIDDEN,
      'not_owner',
      `Pairset ${id} belongs to another engineer; make a new version of it to build your own.`,
    );
  }
  return pairset;
}

async function builtPairset(id: number): Promise<Pairset> {
  const pairset = await existingPairset(id);
  if (pairset.state !== 'built') {
    throw conflict('not_built', `Pairset ${id} is ${pairset.state}; its files exist once it is built.`);
  }
  return pairset;
}

async function assertProjectsExist(projectIds: readonly number[]): Promise<void> {
  const found = new Set(
    (await Project.findAll({ where: { id: { [Op.in]: [...projectIds] } }, attributes: ['id'] })).map(
      (project) => project.id,
    ),
  );
  const missing = projectIds.find((projectId) => !found.has(projectId));
  if (missing !== undefined) throw notFound(`Project ${missing}`);
}

async function assertQuotaLeft(userId: number, transaction: Transaction): Promise<void> {
  const user = await User.findByPk(userId, { transaction });
  if (user?.quotaBytes === null || user?.quotaBytes === undefined) return;
  const usage = await userUsage(userId, transaction);
  const used = usage.stored + usage.reserved;
  if (used >= Number(user.quotaBytes)) {
    throw new AppError(
      HttpStatus.PAYLOAD_TOO_LARGE,
      'quota_exceeded',
      `The quota of ${formatBytes(Number(user.quotaBytes))} is used up (${formatBytes(used)}); a pairset's bytes ` +
        'count against its owner. Delete a pairset or ask an admin for more room.',
      { quotaBytes: Number(user.quotaBytes), usedBytes: used },
    );
  }
}
