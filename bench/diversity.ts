/**
 * Diversity benchmark (not a test): the cluster-moments job over 100,000 moments (1,000 clips × 100 frames of
 * generated descriptors: 12 scenes of very unequal size, as one rig repeating itself beside a few others), run by
 * the worker's real job runtime and thread pool, with k given and with k chosen by the silhouette. The reference in
 * the same run is scikit-learn's KMeans (Debian python3-sklearn; Lloyd, k-means++, the same k and restarts) on the
 * same standardised points; the ratio is ours / scikit-learn's wall time. Goal: ≤ 30 s for 100,000 moments on
 * 2 cores.
 *   npm run bench:diversity [-- --clips 1000 --frames 100 --k 12 --restarts 4]
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { loadConfig } from '../server/core/config';
import { openKinefoldDatabase } from '../server/core/db/open';
import { Clip, Clustering, MomentDescriptor, Project } from '../server/core/models';
import { floatBlob } from '../server/core/models/moment-descriptor.model';
import { createClustering } from '../server/core/diversity/clusterings';
import { clusteredClipIds, loadMomentDescriptors } from '../server/core/diversity/moment-descriptors';
import { createUser } from '../server/core/people/users';
import { createObjectStore } from '../server/core/storage/open-store';
import { workerStorage } from '../worker/storage/worker-storage';
import { APPEARANCE_DIMS, DESCRIPTOR_DIMS, MOTION_DIMS } from '../shared/diversity/descriptor-layout';
import { mulberry32, standardNormal } from '../shared/pairing/seeded-random';
import { clusteringCreateSchema } from '../shared/schemas/diversity';
import { standardise } from '../worker/diversity/cluster-moments';
import { createFramePool } from '../worker/pool/frame-pool';
import { createJobRuntime } from '../worker/runtime/job-runtime';

const { values } = parseArgs({
  options: {
    clips: { type: 'string', default: '1000' },
    frames: { type: 'string', default: '100' },
    k: { type: 'string', default: '12' },
    restarts: { type: 'string', default: '4' },
  },
});
const CLIPS = Number(values.clips);
const FRAMES = Number(values.frames);
const K = Number(values.k);
const RESTARTS = Number(values.restarts);
const SCENES = 12;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-diversity-'));
const config = loadConfig({ KINEFOLD_STORAGE_DIR: path.join(work, 'storage'), KINEFOLD_DEMO: 'off' });

/** Scene centres in descriptor space; scene s takes a share ∝ 1/(s+1)² of the clips (one dominant scene). */
function sceneOf(clip: number, random: () => number): number {
  const weights = Array.from({ length: SCENES }, (_, s) => 1 / (s + 1) ** 2);
  let target = random() * weights.reduce((sum, w) => sum + w, 0);
  for (let s = 0; s < SCENES; s += 1) if ((target -= weights[s]!) < 0) return s;
  return clip % SCENES;
}

async function makeDescriptors(projectId: number, uploaderId: number): Promise<void> {
  const random = mulberry32(17);
  const centres = Array.from({ length: SCENES }, () =>
    Array.from({ length: DESCRIPTOR_DIMS }, () => (random() * 2 - 1) * 3),
  );
  for (let start = 0; start < CLIPS; start += 100) {
    const count = Math.min(100, CLIPS - start);
    const clips = await Clip.bulkCreate(
      Array.from({ length: count }, (_, i) => ({
        projectId,
        uploaderId,
        originalName: `bench-${start + i}.mp4`,
        sizeBytes: 1,
        storedBytes: 1,
        sha256: String(start + i).padStart(64, '0'),
        sourceExt: 'mp4',
        state: 'accepted' as const,
        container: 'mov,mp4',
        codec: 'h264',
        durationS: FRAMES / 5,
        fps: 25,
        width: 320,
        height: 240,
        rotation: 0,
        site: '',
        rig: '',
        capturedAt: null,
        tags: [],
        notes: '',
        frameCount: FRAMES,
        cutCount: 0,
      })),
    );
    await MomentDescriptor.bulkCreate(
      clips.map((clip) => {
        const centre = centres[sceneOf(clip.id, random)]!;
        const moments = Array.from({ length: FRAMES }, () =>
          Float32Array.from(centre, (value) => value + standardNormal(random)),
        );
        return {
          clipId: clip.id,
          frameCount: FRAMES,
          appearance: floatBlob(moments.map((moment) => moment.subarray(0, APPEARANCE_DIMS))),
          motion: floatBlob(moments.map((moment) => moment.subarray(APPEARANCE_DIMS, APPEARANCE_DIMS + MOTION_DIMS))),
        };
      }),
    );
  }
}

async function timedJob(k: number | undefined, userId: number, projectId: number) {
  const pool = createFramePool();
  const runtime = createJobRuntime({
    config,
    storage: workerStorage(config, createObjectStore(config)),
    pool,
    owner: 'bench',
  });
  const created = await createClustering(
    clusteringCreateSchema.parse({ projectIds: [projectId], k, seed: 1, restarts: RESTARTS }),
    userId,
  );
  const start = performance.now();
  await runtime.runOnce();
  const seconds = (performance.now() - start) / 1000;
  await pool.destroy();
  const clustering = (await Clustering.findByPk(created.id))!;
  if (clustering.state !== 'done') throw new Error(`clustering ${clustering.state}: ${clustering.error}`);
  return { seconds, clustering };
}

function sklearnSeconds(points: Float64Array, k: number): number {
  const file = path.join(work, 'points.f64');
  fs.writeFileSync(file, points);
  const script = `
import sys, time
import numpy as np
from sklearn.cluster import KMeans
X = np.fromfile(sys.argv[1], dtype=np.float64).reshape(-1, ${DESCRIPTOR_DIMS})
start = time.perf_counter()
KMeans(n_clusters=${k}, init="k-means++", n_init=${RESTARTS}, algorithm="lloyd", random_state=1).fit(X)
print(time.perf_counter() - start)
`;
  return Number(execFileSync('/usr/bin/python3', ['-c', script, file]).toString());
}

const sequelize = await openKinefoldDatabase(config);
try {
  const user = await createUser(
    { email: 'bench@example.test', name: 'Bench', role: 'engineer', password: 'benchmark-password-long' },
    10,
    null,
  );
  const project = await Project.create({
    name: 'Diversity benchmark',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
  });
  await makeDescriptors(project.id, user.id);
  const { points } = await loadMomentDescriptors(await clusteredClipIds([project.id]));
  const moments = points.length / DESCRIPTOR_DIMS;
  const given = await timedJob(K, user.id, project.id);
  const chosen = await timedJob(undefined, user.id, project.id);
  const reference = sklearnSeconds(standardise(points, DESCRIPTOR_DIMS).points, K);
  console.log(`${moments} moments × ${DESCRIPTOR_DIMS} dims, ${os.availableParallelism()} cores, ${RESTARTS} restarts`);
  console.log(
    `cluster-moments job, k = ${K}: ${given.seconds.toFixed(1)} s (goal ≤ 30 s); ` +
      `inertia ${given.clustering.inertia!.toFixed(0)}; sizes ${given.clustering.sizes!.join(' ')}`,
  );
  console.log(
    `cluster-moments job, k by silhouette: ${chosen.seconds.toFixed(1)} s, chose k = ${chosen.clustering.k} ` +
      `(silhouettes ${chosen.clustering.silhouettes!.map((s) => `${s.k}:${s.silhouette.toFixed(3)}`).join(' ')})`,
  );
  console.log(
    `scikit-learn KMeans, same k and restarts: ${reference.toFixed(1)} s; ratio ours / scikit-learn ` +
      `${(given.seconds / reference).toFixed(1)}× (the job also loads descriptors and writes labels)`,
  );
} finally {
  await sequelize.close();
  fs.rmSync(work, { recursive: true, force: true });
}
