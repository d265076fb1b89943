import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { definitionViews } from '../../shared/schemas/pairsets';
import type { PairsetManifest, ShardSummary } from '../../shared/types/pairsets';
import { Pairset, Shard } from '../../server/core/models';
import { loadPairsetSources } from '../../server/core/pairsets/pairset-sources';
import { planDefinition } from '../../server/core/pairsets/pairset-plan';
import { pairsetStatistics } from '../../server/core/pairsets/pairset-statistics';
import { checkUserQuotaThresholds } from '../../server/core/usage/quota-warnings';
import { objectKeys, PAIRSET_MANIFEST, pairsetWorkPrefix, type StoragePaths } from '../../server/core/storage/paths';
import { joinKey, type ObjectStore } from '../../server/core/storage/object-store';
import { BUILD_STAGE, BuildStoppedError, watchBuild } from '../pairsets/build-watch';
import { difficultyReport } from '../pairsets/difficulty-report';
import { stableJson } from '../pairsets/stable-json';
import { writeShards } from '../pairsets/write-shards';
import { createViewReader } from '../pairsets/view-reader';
import { cancelJob, enterJobStage, finishJob } from '../../server/core/jobs/claim';
import type { Handler, JobContext } from './handler';
import { FinalJobError, LeaseLostError } from './job-errors';

export const PAIRSET_FORMAT = 'kinefold-pairset/1';
/** Share of the progress bar for writing shards; the pair-difficulty report takes the rest. */
const SHARDS_SHARE = 0.85;

/**
 * build-pairset: plans the pairs of the definition over the accepted clips, writes the shards and pairset.json
 * into a work folder, measures pair difficulty on a sample, moves them to the pairset's keys in the store and records shards,
 * statistics and bytes in one short transaction. Between pairs it watches for a cancel; a cancelled, deleted or
 * failed build leaves no files. Every attempt starts from scratch: the output depends only on the definition and
 * the clips, so a retried or repeated build gives the same bytes.
 */
export const buildPairset: Handler<'build-pairset'> = {
  async run({ payload }, context) {
    const { pairsetId } = payload;
    await removeLeftoverWork(context.paths, pairsetId);
    const pairset = await Pairset.findByPk(pairsetId);
    if (!pairset || pairset.state !== 'building') {
      await cancelJob(context.lease);
      return;
    }
    if (!(await enterJobStage(context.lease, BUILD_STAGE))) throw new LeaseLostError(context.lease.jobId);
    const work = context.paths.pairsetWorkDir(pairsetId, randomUUID().slice(0, 8));
    try {
      const placed = await build(pairset, work, context);
      if (!placed) await cancelJob(context.lease);
    } catch (error) {
      if (!(error instanceof BuildStoppedError)) throw error;
      await cancelJob(context.lease);
    } finally {
      await fs.promises.rm(work, { recursive: true, force: true });
    }
  },

  async recordFailure({ payload }, failure, _context, transaction) {
    await Pairset.update(
      { state: 'failed', error: failure.message },
      { where: { id: payload.pairsetId, state: 'building' }, transaction },
    );
  },
};

/** Builds into `work` and moves the result into place; false when the pairset stopped being built meanwhile. */
async function build(pairset: Pairset, work: string, context: JobContext): Promise<boolean> {
  const { store, lease, signal } = context;
  const { definition } = pairset;
  const outDir = path.join(work, 'out');
  const stagingDir = path.join(work, 'staging');
  await fs.promises.mkdir(outDir, { recursive: true });
  await fs.promises.mkdir(stagingDir, { recursive: true });
  const progress = watchBuild(pairset.id, lease, signal);

  const sources = await loadPairsetSources(definition);
  const { pairs } = definitionViews(definition);
  const { planned, balance, clusters } = await planDefinition(definition, sources, pairs);
  if (planned.length === 0) {
    throw new FinalJobError(
      'The definition gives no pairs: no accepted clip matches it, or every moment is ' +
        'filtered out (cuts, clip ends, missing motion fields, motion filters). Check the counts in the form.',
    );
  }
  const clips = new Map(sources.map((clip) => [clip.id, clip]));
  const reader = createViewReader(store, clips);
  const shards = await writeShards(planned, {
    outDir,
    stagingDir,
    shardMB: definition.shardMB,
    clips,
    member: { reader, motionFormat: definition.motionFormat, outputSize: definition.outputSize },
    clusters,
    progress: (share) => progress(share * SHARDS_SHARE),
  });
  const difficulty = await difficultyReport(planned, pairs, {
    reader,
    pool: context.pool,
    signal,
    temperature: definition.temperature,
    seed: definition.split.seed,
    progress: (share) => progress(SHARDS_SHARE + share * (1 - SHARDS_SHARE)),
  });
  const statistics = { ...pairsetStatistics(planned, pairs, sources), ...(balance ? { clusters: balance } : {}) };
  const manifest: PairsetManifest = {
    format: PAIRSET_FORMAT,
    pairset: { id: pairset.id, name: pairset.name, version: pairset.version },
    definition,
    seed: pairset.seed,
    shards,
    statistics,
    difficulty,
  };
  const manifestBytes = Buffer.from(`${stableJson(manifest, 2)}\n`);
  await fs.promises.writeFile(path.join(outDir, PAIRSET_MANIFEST), manifestBytes);
  await progress(1);

  await publishBuild(store, outDir, pairset.id);
  const target = objectKeys.pairsetDir(pairset.id);
  const bytes = shards.reduce((sum, shard) => sum + shard.bytes, manifestBytes.length);
  try {
    const committed = await commit(pairset.id, shards, { stats: statistics, difficulty, bytes }, context);
    if (!committed) await store.delete(target);
    return committed;
  } catch (error) {
    await store.delete(target);
    throw error;
  }
}

/**
 * Moves the built files to the pairset's keys, replacing an earlier build's, with pairset.json last: until the
 * commit marks the pairset built nobody is given them, and a reader that sees the manifest sees every shard.
 */
async function publishBuild(store: ObjectStore, outDir: string, pairsetId: number): Promise<void> {
  const target = objectKeys.pairsetDir(pairsetId);
  await store.delete(target);
  const names = (await fs.promises.readdir(outDir)).sort(
    (a, b) => Number(a === PAIRSET_MANIFEST) - Number(b === PAIRSET_MANIFEST) || a.localeCompare(b),
  );
  for (const name of names) await store.putFile(joinKey(target, name), path.join(outDir, name), { move: true });
}

/** Records the built pairset and finishes the job in one transaction, if the pairset is still being built. */
async function commit(
  pairsetId: number,
  shards: ShardSummary[],
  result: Pick<Pairset, 'stats' | 'difficulty' | 'bytes'>,
  context: JobContext,
): Promise<boolean> {
  return Pairset.sequelize!.transaction(async (transaction) => {
    const current = await Pairset.findByPk(pairsetId, { transaction });
    if (!current || current.state !== 'building') return false;
    if (!(await finishJob(context.lease, transaction))) throw new LeaseLostError(context.lease.jobId);
    await Shard.destroy({ where: { pairsetId }, transaction });
    await Shard.bulkCreate(
      shards.map((shard) => ({
        pairsetId,
        index: shard.index,
        split: shard.split,
        pairCount: shard.pairCount,
        bytes: shard.bytes,
        sha256: shard.sha256,
      })),
      { transaction },
    );
    await current.update(
      {
        ...result,
        state: 'built',
        progress: 1,
        error: null,
        builtAt: new Date(),
      },
      { transaction },
    );
    await checkUserQuotaThresholds(current.ownerId, context.config.publicUrl, transaction);
    return true;
  });
}

/** Work folders an interrupted attempt at this pairset left behind. */
async function removeLeftoverWork(paths: StoragePaths, pairsetId: number): Promise<void> {
  const prefix = pairsetWorkPrefix(pairsetId);
  const entries = await fs.promises.readdir(paths.pairsetsDir).catch(() => [] as string[]);
  await Promise.all(
    entries
      .filter((name) => name.startsWith(prefix))
      .map((name) => fs.promises.rm(path.join(paths.pairsetsDir, name), { recursive: true, force: true })),
  );
}
