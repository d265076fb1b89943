import { Op } from 'sequelize';
import type { ClusteringCreateBody, ClusteringListQuery } from '../../../shared/schemas/diversity';
import type { ClusteringSummary, SimilarClips } from '../../../shared/types/diversity';
import { recordAudit } from '../audit/audit';
import { conflict, notFound } from '../errors';
import { enqueueJob } from '../jobs/enqueue';
import { Clip, ClipCluster, Clustering, MomentDescriptor, Project } from '../models';
import { clipDescriptor } from './moment-descriptors';

/** Similar clips shown at most. */
const SIMILAR_LIMIT = 12;
const LIST_LIMIT = 50;

/**
 * Clusterings of moments: created here and run by the worker's cluster-moments job (k-means over 100,000 moments
 * takes seconds; the server never does it in a request). Reads use what the job stored.
 */
export async function createClustering(body: ClusteringCreateBody, actorId: number): Promise<ClusteringSummary> {
  const found = await Project.count({ where: { id: { [Op.in]: body.projectIds } } });
  if (found !== body.projectIds.length) {
    const ids = new Set((await Project.findAll({ attributes: ['id'] })).map((project) => project.id));
    throw notFound(`Project ${body.projectIds.find((id) => !ids.has(id))}`);
  }
  const id = await Clustering.sequelize!.transaction(async (transaction) => {
    const created = await Clustering.create(
      {
        projectIds: [...body.projectIds].sort((x, y) => x - y),
        requestedK: body.k ?? null,
        seed: body.seed,
        restarts: body.restarts,
        state: 'queued',
        createdById: actorId,
      },
      { transaction },
    );
    await enqueueJob('cluster-moments', { clusteringId: created.id }, { transaction });
    await recordAudit(
      {
        actorId,
        action: 'clustering.create',
        targetType: 'clustering',
        targetId: created.id,
        detail: { projectIds: body.projectIds, k: body.k ?? null },
      },
      transaction,
    );
    return created.id;
  });
  return getClustering(id);
}

export async function getClustering(id: number): Promise<ClusteringSummary> {
  const clustering = await Clustering.findByPk(id);
  if (!clustering) throw notFound(`Clustering ${id}`);
  return clustering.toApi();
}

/** The latest clusterings, newest first; with projectId, those covering that project. */
export async function listClusterings(query: ClusteringListQuery): Promise<ClusteringSummary[]> {
  const rows = await Clustering.findAll({ order: [['id', 'DESC']], limit: query.projectId ? undefined : LIST_LIMIT });
  return rows
    .filter((row) => query.projectId === undefined || row.projectIds.includes(query.projectId))
    .slice(0, LIST_LIMIT)
    .map((row) => row.toApi());
}

/**
 * Clips in the same cluster as this one in the latest finished clustering that took it, nearest first: the
 * Euclidean distance between the clips' mean descriptors, standardised as the clustering standardised them.
 */
export async function similarClips(clipId: number): Promise<SimilarClips> {
  const clip = await Clip.findByPk(clipId, { attributes: ['id', 'projectId'] });
  if (!clip) throw notFound(`Clip ${clipId}`);
  const none: SimilarClips = { clusteringId: null, cluster: null, items: [] };
  const own = await ClipCluster.findOne({
    where: { clipId },
    order: [['clusteringId', 'DESC']],
  });
  if (!own) return none;
  const clustering = await Clustering.findByPk(own.clusteringId);
  if (!clustering || clustering.state !== 'done' || !clustering.scaling) return none;
  const peers = await ClipCluster.findAll({
    where: { clusteringId: clustering.id, cluster: own.cluster, clipId: { [Op.ne]: clipId } },
    attributes: ['clipId'],
  });
  const ids = [clipId, ...peers.map((peer) => peer.clipId)];
  const descriptors = new Map(
    (await MomentDescriptor.findAll({ where: { clipId: { [Op.in]: ids } } })).map((row) => [
      row.clipId,
      clipDescriptor(row, clustering.scaling!),
    ]),
  );
  const mine = descriptors.get(clipId);
  if (!mine) return { clusteringId: clustering.id, cluster: own.cluster, items: [] };
  const clips = new Map(
    (
      await Clip.findAll({
        where: { id: { [Op.in]: ids.slice(1) } },
        attributes: ['id', 'originalName', 'site', 'state'],
      })
    ).map((row) => [row.id, row]),
  );
  const items = ids
    .slice(1)
    .flatMap((id) => {
      const other = descriptors.get(id);
      const row = clips.get(id);
      if (!other || !row) return [];
      let squared = 0;
      for (let j = 0; j < mine.length; j += 1) squared += (mine[j]! - other[j]!) ** 2;
      return [
        {
          clipId: id,
          originalName: row.originalName,
          site: row.site,
          state: row.state,
          cluster: own.cluster,
          distance: Math.sqrt(squared),
        },
      ];
    })
    .sort((x, y) => x.distance - y.distance || x.clipId - y.clipId)
    .slice(0, SIMILAR_LIMIT);
  return { clusteringId: clustering.id, cluster: own.cluster, items };
}

/** SQLite binds at most 999 parameters in old builds; clip ids go in chunks well below that. */
const ID_CHUNK = 500;

/** A finished clustering's moment labels for these clips: cluster of (clip, frame), null where it has none. */
export async function clusterLookup(clusteringId: number, clipIds: readonly number[]) {
  const clustering = await Clustering.findByPk(clusteringId);
  if (!clustering) throw notFound(`Clustering ${clusteringId}`);
  if (clustering.state !== 'done') {
    throw conflict('clustering_not_done', `Clustering ${clusteringId} is ${clustering.state}; use a finished one.`);
  }
  const byClip = new Map<number, ClipCluster>();
  for (let start = 0; start < clipIds.length; start += ID_CHUNK) {
    const chunk = clipIds.slice(start, start + ID_CHUNK);
    for (const row of await ClipCluster.findAll({ where: { clusteringId, clipId: { [Op.in]: chunk } } })) {
      byClip.set(row.clipId, row);
    }
  }
  return {
    clustering,
    clusterOf: (clip: number, frame: number) => byClip.get(clip)?.momentCluster(frame) ?? null,
  };
}
