import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClipCluster, Clustering, type User } from '../../server/core/models';
import { createClustering, similarClips } from '../../server/core/diversity/clusterings';
import { getPairsetDetail, newPairsetVersion, previewPairset, startBuild } from '../../server/core/pairsets/pairsets';
import { storagePaths } from '../../server/core/storage/paths';
import { clusteringCreateSchema } from '../../shared/schemas/diversity';
import type { PairsetDetail } from '../../shared/types/pairsets';
import { addMomentDescriptors } from '../helpers/moment-descriptors';
import { addPairsetClip } from '../helpers/pairset-clips';
import { buildPairsetNow, pairsetDefinition } from '../helpers/pairset-build';
import { addProject } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';
import { readUstar } from '../helpers/ustar-reader';

let server: TestServer;
let runtime: TestRuntime;
let engineer: User;
let projectId: number;
const clipIds: number[] = [];
let clusteringId: number;

const FRAMES = 8;
const CAP_SHARE = 0.4;

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  engineer = await addUser(server, 'engineer');
  const admin = await addUser(server, 'admin');
  projectId = (await addProject(admin.id, 'orchard rows')).id;
  // One rig repeating itself (seeds 1..1 with the same pattern, 6 clips) beside a few other scenes.
  const scenes = [1, 1, 1, 1, 1, 1, 20, 20, 40, 60];
  for (const [n, seed] of scenes.entries()) {
    const clip = await addPairsetClip(server, {
      projectId,
      uploaderId: admin.id,
      frames: FRAMES,
      seed,
      shift: n < 6 ? 1 : 3,
      site: `site ${seed}`,
    });
    await addMomentDescriptors(server, clip.id, FRAMES);
    clipIds.push(clip.id);
  }
  const created = await createClustering(
    clusteringCreateSchema.parse({ projectIds: [projectId], k: 3, seed: 5, restarts: 3 }),
    engineer.id,
  );
  await runtime.drain();
  clusteringId = created.id;
});

afterAll(async () => {
  await runtime?.close();
  await server?.close();
});

describe('cluster-moments job', () => {
  it('clusters every described moment and stores each clip’s labels', async () => {
    const clustering = (await Clustering.findByPk(clusteringId))!;
    expect(clustering.state).toBe('done');
    expect(clustering.k).toBe(3);
    expect(clustering.momentCount).toBe(clipIds.length * FRAMES);
    expect(clustering.sizes!.reduce((sum, size) => sum + size, 0)).toBe(clipIds.length * FRAMES);
    const rows = await ClipCluster.findAll({ where: { clusteringId }, order: [['clipId', 'ASC']] });
    expect(rows.map((row) => row.clipId)).toEqual(clipIds);
    for (const row of rows) expect(row.labels.length).toBe(FRAMES);
    // The six clips of one scene share a cluster.
    expect(new Set(rows.slice(0, 6).map((row) => row.cluster)).size).toBe(1);
  });

  it('chooses k by the silhouette when none is given', async () => {
    const created = await createClustering(clusteringCreateSchema.parse({ projectIds: [projectId] }), engineer.id);
    await runtime.drain();
    const clustering = (await Clustering.findByPk(created.id))!;
    expect(clustering.state).toBe('done');
    const best = clustering.silhouettes!.reduce((x, y) => (y.silhouette > x.silhouette ? y : x));
    expect(clustering.k).toBe(best.k);
  });

  it('fails with a clear message when there are too few moments', async () => {
    const empty = await addProject(engineer.id, 'empty field');
    const created = await createClustering(clusteringCreateSchema.parse({ projectIds: [empty.id], k: 2 }), engineer.id);
    await runtime.drain();
    const clustering = (await Clustering.findByPk(created.id))!;
    expect(clustering.state).toBe('failed');
    expect(clustering.error).toMatch(/0 described moments/);
  });
});

describe('similar clips', () => {
  it('lists the clips of the same cluster, nearest first', async () => {
    const similar = await similarClips(clipIds[0]!);
    expect(similar.items.length).toBeGreaterThanOrEqual(5);
    const distances = similar.items.map((item) => item.distance);
    expect(distances).toEqual([...distances].sort((x, y) => x - y));
    expect(similar.items.every((item) => item.cluster === similar.cluster)).toBe(true);
    expect(similar.items.map((item) => item.clipId)).not.toContain(clipIds[0]);
  });
});

describe('a balanced pairset', () => {
  let built: PairsetDetail;
  const fields = () => ({
    projectIds: [projectId],
    views: ['frame', 'luma', 'chroma'] as ('frame' | 'luma' | 'chroma')[],
    split: { val: 0.3, seed: 9 },
    shardMB: 0.05,
    diversity: { clusteringId, capShare: CAP_SHARE, mixClusters: true },
  });

  beforeAll(async () => {
    built = await buildPairsetNow(runtime, engineer, fields());
  });

  it('holds the share cap and reports cluster sizes before and after, as the preview did', async () => {
    expect(built.state).toBe('built');
    const clusters = built.stats!.clusters!;
    expect(clusters.largestShareBefore).toBeGreaterThan(CAP_SHARE);
    expect(clusters.largestShareAfter).toBeLessThanOrEqual(CAP_SHARE);
    for (const row of clusters.clusters) expect(row.after / clusters.momentsAfter).toBeLessThanOrEqual(CAP_SHARE);
    expect(built.stats!.moments).toBe(clusters.momentsAfter);
    const preview = await previewPairset(pairsetDefinition(fields()));
    expect(preview.clusters).toEqual(clusters);
  });

  it('records each moment’s cluster in pair.json and mixes clusters along the shards', async () => {
    const paths = storagePaths(server.storageDir);
    const labels = new Map((await ClipCluster.findAll({ where: { clusteringId } })).map((row) => [row.clipId, row]));
    const train = built.shards.filter((shard) => shard.split === 'train');
    const order: number[] = [];
    for (const shard of train) {
      const archive = readUstar(fs.readFileSync(paths.pairsetShard(built.id, shard.split, shard.index)));
      for (const member of archive.members.filter((m) => m.name.endsWith('/pair.json'))) {
        const pair = JSON.parse(member.data.toString()) as {
          clip: { id: number };
          moment: { frame: number };
          cluster: { clustering: number; id: number };
          kind: string;
        };
        expect(pair.cluster).toEqual({
          clustering: clusteringId,
          id: labels.get(pair.clip.id)!.momentCluster(pair.moment.frame),
        });
        if (pair.kind === 'frame~luma') order.push(pair.cluster.id);
      }
    }
    // Neighbouring pairs of one kind come from different clusters while more than one cluster has moments left.
    const clustersLeft = new Set(order).size;
    expect(clustersLeft).toBeGreaterThan(1);
    expect(order[0]).not.toBe(order[1]);
  });

  it('is byte-identical when built again', async () => {
    const again = await newPairsetVersion(built.id, engineer.id);
    await startBuild(again.id, engineer);
    await runtime.drain();
    const rebuilt = await getPairsetDetail(again.id);
    expect(rebuilt.shards).toEqual(built.shards);
    const paths = storagePaths(server.storageDir);
    for (const shard of built.shards) {
      const digest = (id: number) =>
        createHash('sha256')
          .update(fs.readFileSync(paths.pairsetShard(id, shard.split, shard.index)))
          .digest('hex');
      expect(digest(rebuilt.id)).toBe(digest(built.id));
    }
    expect(rebuilt.stats).toEqual(built.stats);
  });
});
