import fs from 'node:fs';
import type { ClipState } from '../../shared/clip-states';
import { checkQuotaThresholds } from '../../server/core/usage/quota-warnings';
import { Clip, Project } from '../../server/core/models';
import { recordClipFailure } from '../pipeline/clip-failure';
import { flagsStage } from '../pipeline/flags-stage';
import { motionStage } from '../pipeline/motion-stage';
import { pipelineSettings } from '../pipeline/project-settings';
import { sampleStage } from '../pipeline/sample-stage';
import { createSignalsStage } from '../pipeline/signals-stage';
import type { PipelineStage } from '../pipeline/stage';
import { openWorkDir, removeLeftoverWorkDirs, type WorkDir } from '../pipeline/work-dir';
import { clipStoredUsage } from '../../server/core/storage/stored-usage';
import { objectKeys } from '../../server/core/storage/paths';
import { heldBytes } from '../../server/core/usage/derived-bytes';
import { enterJobStage, finishJob, reportJobProgress, type Lease } from '../../server/core/jobs/claim';
import type { Handler, JobContext } from './handler';
import { LeaseLostError } from './job-errors';

/**
 * The Motion stage: motion fields for neighbour pairs that do not span a cut, between signals and flags
 * (DESIGN §5). Its fields are also the motion input of the flags stage (static, shaky). Luma and chroma views are
 * derived from the frames when asked (server/core/media/frame-views.ts), so no stage stores them.
 */
const MOTION_STAGES: readonly PipelineStage[] = [motionStage];

const PROGRESS_INTERVAL_MS = 500;

/**
 * process-clip: runs the stages in order. The job row remembers the stage in hand, and each stage's commit moves
 * it on in the same transaction as the stage's rows, so a job claimed again after a crash resumes at the stage
 * that did not commit and redoes only that one.
 * `cutEvidence: false` is for the cut detector's cost benchmark only (bench/cut-realtime.ts): its reference runs
 * decide cuts by the histogram alone.
 */
export function createProcessClip({ cutEvidence }: { cutEvidence: boolean }): Handler<'process-clip'> {
  const stages: readonly PipelineStage[] = [
    sampleStage,
    createSignalsStage({ cutEvidence }),
    ...MOTION_STAGES,
    flagsStage,
  ];
  return {
    async run({ job, payload }, context) {
      const { clipId } = payload;
      if (!(await Clip.findByPk(clipId))) return;
      await removeLeftoverWorkDirs(context.paths.clipDir(clipId));
      const first = await firstStage(stages, clipId, job.stage);
      try {
        // Beside a bucket: the stored files this attempt reads, the source only if it starts at sample.
        await context.mirror.pull(clipId, { source: first === 0 });
        for (let i = first; i < stages.length; i += 1) {
          if (!(await runStage(stages[i]!, stages[i + 1] ?? null, clipId, context))) return;
        }
      } catch (error) {
        if (await removeIfClipDeleted(clipId, context)) return;
        throw error;
      } finally {
        await context.mirror.release(clipId);
      }
    },
    recordFailure: recordClipFailure,
  };
}

export const processClip = createProcessClip({ cutEvidence: true });
/**
 * Where a claimed job resumes: at the stage that did not commit. A clip whose frames are still in the original
 * format starts again from sample, so no later stage mixes the two formats.
 */
async function firstStage(stages: readonly PipelineStage[], clipId: number, stage: string | null): Promise<number> {
  const clip = await Clip.findByPk(clipId, { attributes: ['derivedFormat'] });
  if (clip?.derivedFormat !== 'packed') return 0;
  return Math.max(
    0,
    stages.findIndex((each) => each.name === stage),
  );
}

/** Runs one stage on a freshly loaded clip; false when the clip was deleted meanwhile. */
async function runStage(stage: PipelineStage, next: PipelineStage | null, clipId: number, context: JobContext) {
  // A stop or a lost lease between two stages ends the job here, before the next stage begins.
  context.signal.throwIfAborted();
  const clip = await Clip.findByPk(clipId);
  const project = clip && (await Project.findByPk(clip.projectId));
  if (!clip || !project) return false;
  const settings = pipelineSettings(project);
  await enterStage(stage, clip, context.lease);
  const progress = progressWriter(context.lease, stage.name);
  const clipDir = context.paths.clipDir(clipId);
  let work: WorkDir | null = null;
  try {
    await stage.run({
      clip,
      project,
      settings,
      paths: context.paths,
      pool: context.pool,
      signal: context.signal,
      progress: progress.report,
      workDir: async () => (work ??= await openWorkDir(clipDir, stage.name)),
      async commit(write) {
        await progress.settled();
        // The outputs are in the store before the stage counts as done, so a worker that resumes the clip finds them.
        await context.mirror.push(clipId);
        // The same measure the reconcile-usage job uses, so the two never disagree; until the last stage the
        // admission's prediction of the derived bytes still holds the quota if it is the larger.
        const measured = (await clipStoredUsage(context.store, clipId)).total;
        const storedBytes = heldBytes(clip, measured, next === null);
        await Clip.sequelize!.transaction(async (transaction) => {
          const held = next
            ? await enterJobStage(context.lease, next.name, transaction)
            : await finishJob(context.lease, transaction);
          if (!held) throw new LeaseLostError(context.lease.jobId);
          await Clip.update({ storedBytes }, { where: { id: clipId }, transaction });
          await checkQuotaThresholds(clip.projectId, clip.uploaderId, context.config.publicUrl, transaction);
          await write?.(transaction);
        });
      },
    });
  } finally {
    await (work as WorkDir | null)?.remove();
  }
  return true;
}

/** Shows the stage on the job and the clip; a clip not yet reviewed is `processing` meanwhile. */
async function enterStage(stage: PipelineStage, clip: Clip, lease: Lease): Promise<void> {
  await Clip.sequelize!.transaction(async (transaction) => {
    if (!(await enterJobStage(lease, stage.name, transaction))) throw new LeaseLostError(lease.jobId);
    await Clip.update(
      { stage: stage.name, state: stateWhileProcessing(clip.state), error: null },
      { where: { id: clip.id }, transaction },
    );
  });
}

function stateWhileProcessing(state: ClipState): ClipState {
  return state === 'accepted' || state === 'rejected' ? state : 'processing';
}

/** Writes progress at most twice a second, one write at a time; the commit waits for the last one. */
function progressWriter(lease: Lease, stage: string) {
  let lastAt = 0;
  let pending: Promise<void> = Promise.resolve();
  return {
    report(share: number) {
      const now = Date.now();
      if (now - lastAt < PROGRESS_INTERVAL_MS) return;
      lastAt = now;
      pending = pending
        .then(() => reportJobProgress(lease, stage, Math.round(share * 1000) / 1000))
        .then(
          () => undefined,
          (error: unknown) => console.warn(`Kinefold worker: progress not saved: ${error}`),
        );
    },
    settled: () => pending,
  };
}

/**
 * The clip was deleted while we worked (its job row went with it): the server removed its stored files, but files
 * we wrote or published since may have brought some back. Remove them again and stop quietly.
 */
async function removeIfClipDeleted(clipId: number, { store, paths }: JobContext): Promise<boolean> {
  if (await Clip.findByPk(clipId)) return false;
  await fs.promises.rm(paths.clipDir(clipId), { recursive: true, force: true });
  await store.delete(objectKeys.clipDir(clipId));
  return true;
}
