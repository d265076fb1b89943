import fs from 'node:fs';
import { Frame, MomentDescriptor, MotionField } from '../../server/core/models';
import { MOTION_DIMS } from '../../shared/diversity/descriptor-layout';
import { floatBlob } from '../../server/core/models/moment-descriptor.model';
import type { PairMotion } from '../pool/motion-tasks';
import type { FieldSummary } from '../motion/fields/field-summary';
import { forEachFrame } from './each-frame';
import { motionSettings } from './motion-settings';
import { neighbourRuns, splitRuns } from './motion-runs';
import type { PipelineStage } from './stage';

/**
 * motion: for each neighbour pair t → t+1 that no cut separates, a forward and a backward field with the project's
 * estimator and parameters (worker/motion/), recorded on every row. Each field's consistency is checked against
 * the other one (consistency.ts: |w_f(x) + w_b(x + w_f(x))|² < 0.01(|w_f|² + |w_b|²) + 0.5, after Sundaram, Brox
 * & Keutzer, ECCV 2010) and it is summarised (field-summary.ts). Files: motion/<t>.field, the forward field
 * packed with its consistency plane (server/core/media/packed-field.ts). The backward field serves only the check
 * and is not kept; colour pictures are drawn from the stored field when asked. The work runs in the thread pool.
 */
export const motionStage: PipelineStage = {
  name: 'motion',
  async run(context) {
    const { clip, project, pool, paths } = context;
    const { estimator, params } = motionSettings(project);
    const frames = await Frame.findAll({
      where: { clipId: clip.id },
      order: [['index', 'ASC']],
      attributes: ['index', 'cutBefore'],
    });
    const runs = splitRuns(neighbourRuns(frames), pool.threads);
    const layout = paths.clipDerived(clip.id);
    const work = await context.workDir();
    await fs.promises.mkdir(work.layout.motionDir, { recursive: true });

    const estimated = await forEachFrame(runs.length, context, (r, signal) => {
      const { first, pairs } = runs[r]!;
      const from = Array.from({ length: pairs }, (_, k) => first + k);
      return pool.estimateMotionRun(
        {
          frameFiles: [...from, first + pairs].map(layout.frame),
          estimator,
          params,
          forwardFiles: from.map(work.layout.motionField),
        },
        signal,
      );
    });
    const fields = runs.flatMap((run, r) => estimated[r]!.map((pair, k) => ({ fromIndex: run.first + k, ...pair })));
    await work.moveIntoPlace(layout, ['motionDir']);
    const recorded = { clipId: clip.id, estimator, params: params as unknown as MotionField['params'] };
    await context.commit(async (transaction) => {
      await MotionField.destroy({ where: { clipId: clip.id }, transaction });
      await MotionField.bulkCreate(
        fields.flatMap((field) => rows(field, recorded)),
        { transaction },
      );
      await MomentDescriptor.update(
        { motion: motionDescriptors(fields, frames.length) },
        { where: { clipId: clip.id }, transaction },
      );
    });
  },
};

/** The motion parts of every moment's descriptor, zeros where no field leaves the moment. */
function motionDescriptors(fields: readonly (PairMotion & { fromIndex: number })[], frameCount: number): Buffer {
  const parts: Float32Array[] = Array.from({ length: frameCount }, () => new Float32Array(MOTION_DIMS));
  for (const field of fields) if (field.fromIndex < frameCount) parts[field.fromIndex] = field.descriptor;
  return floatBlob(parts);
}

/** The forward row (t → t+1) and the backward row (t+1 → t) of one pair. */
function rows(
  { fromIndex, forward, backward }: PairMotion & { fromIndex: number },
  recorded: Pick<MotionField, 'clipId' | 'estimator' | 'params'>,
) {
  const row = (from: number, to: number, direction: MotionField['direction'], summary: FieldSummary) => ({
    ...recorded,
    fromIndex: from,
    toIndex: to,
    direction,
    ...summary,
  });
  return [row(fromIndex, fromIndex + 1, 'forward', forward), row(fromIndex + 1, fromIndex, 'backward', backward)];
}
