import { setMaxListeners } from 'node:events';
import { DESCRIPTOR_DIMS } from '../../shared/diversity/descriptor-layout';
import { ClipCluster, Clustering } from '../../server/core/models';
import { NO_CLUSTER } from '../../server/core/models/clip-cluster.model';
import { clusteredClipIds, loadMomentDescriptors } from '../../server/core/diversity/moment-descriptors';
import { finishJob } from '../../server/core/jobs/claim';
import { clusterMoments } from '../diversity/cluster-moments';
import type { Handler } from './handler';
import { FinalJobError, LeaseLostError } from './job-errors';

/**
 * cluster-moments: k-means over the moment descriptors of the clustering's projects (worker/diversity/), the
 * restarts and candidate k spread over the thread pool, then the clustering's figures and every clip's labels in
 * one short transaction. A retry starts over; the result depends only on the descriptors and the options.
 */
export const clusterMomentsJob: Handler<'cluster-moments'> = {
  async run({ payload }, context) {
    const clustering = await Clustering.findByPk(payload.clusteringId);
    if (!clustering) return;
    await Clustering.update({ state: 'running', error: null }, { where: { id: clustering.id } });
    const clipIds = await clusteredClipIds(clustering.projectIds);
    const { refs, points } = await loadMomentDescriptors(clipIds);
    if (refs.length < 3 || (clustering.requestedK !== null && refs.length < clustering.requestedK)) {
      throw new FinalJobError(
        `These projects have ${refs.length} described moments (clips awaiting review or accepted); ` +
          `clustering needs at least ${Math.max(3, clustering.requestedK ?? 0)}.`,
      );
    }
    // Every restart and candidate k is a pool task listening to the job's one signal: dozens at once, on purpose.
    setMaxListeners(Infinity, context.signal);
    const result = await clusterMoments(
      points,
      DESCRIPTOR_DIMS,
      { k: clustering.requestedK, seed: clustering.seed, restarts: clustering.restarts },
      (task) => context.pool.runKMeans(task, context.signal),
    );
    const sizes = new Array<number>(result.k).fill(0);
    for (const label of result.labels) sizes[label] += 1;
    const perClip = clipLabels(refs, result.labels, result.k);
    await Clustering.sequelize!.transaction(async (transaction) => {
      if (!(await Clustering.findByPk(clustering.id, { transaction }))) return;
      if (!(await finishJob(context.lease, transaction))) throw new LeaseLostError(context.lease.jobId);
      await ClipCluster.destroy({ where: { clusteringId: clustering.id }, transaction });
      await ClipCluster.bulkCreate(
        perClip.map((clip) => ({ clusteringId: clustering.id, ...clip })),
        { transaction },
      );
      await Clustering.update(
        {
          state: 'done',
          k: result.k,
          momentCount: refs.length,
          inertia: result.inertia,
          silhouettes: result.silhouettes,
          scaling: result.scaling,
          centres: result.centres,
          sizes,
          doneAt: new Date(),
        },
        { where: { id: clustering.id }, transaction },
      );
    });
  },

  async recordFailure({ payload }, failure, _context, transaction) {
    await Clustering.update(
      { state: 'failed', error: failure.message },
      { where: { id: payload.clusteringId }, transaction },
    );
  },
};

/** Each clip's moment labels as bytes, and its own cluster: the most frequent label, the lower on a tie. */
function clipLabels(refs: readonly { clipId: number; frame: number }[], labels: Int32Array, k: number) {
  const byClip = new Map<number, { frames: number[]; labels: number[] }>();
  refs.forEach((ref, i) => {
    const entry = byClip.get(ref.clipId) ?? { frames: [], labels: [] };
    entry.frames.push(ref.frame);
    entry.labels.push(labels[i]!);
    byClip.set(ref.clipId, entry);
  });
  return [...byClip].map(([clipId, entry]) => {
    const bytes = Buffer.alloc(Math.max(...entry.frames) + 1, NO_CLUSTER);
    const counts = new Array<number>(k).fill(0);
    entry.frames.forEach((frame, i) => {
      bytes[frame] = entry.labels[i]!;
      counts[entry.labels[i]!] += 1;
    });
    const cluster = counts.indexOf(Math.max(...counts));
    return { clipId, cluster, labels: bytes };
  });
}
