import fs from 'node:fs';
import { Frame, MomentDescriptor, MotionField } from '../../server/core/models';
import { MOTION_DIMS } from '../../shared/diversity/descriptor-layout';
import { floatBlob } from '../../server/core/models/moment-descriptor.model';
import { clipMotionScale } from '../../shared/motion/motion-scale';
import type { PairMotion } from '../pool/motion-tasks';
import type { FieldSummary } from '../motion/fields/field-summary';
import { forEachFrame } from './each-frame';
import { motionSettings } from './motion-settings';
import { neighbourRuns, splitRuns } from './motion-runs';
import type { PipelineStage, StageContext } from './stage';

/** Share of the stage's progress the fields take; the colour pictures take the rest. */
const FIELDS_SHARE = 0.85;

/**
 * motion: for each neighbour pair t → t+1 that no cut separates, a forward and a backward field with the project's
 * estimator and parameters (worker/motion/), recorded on every row. Each field's consistency is checked against
 * the other one (consistency.ts: |w_f(x) + w_b(x + w_f(x))|² < 0.01(|w_f|² + |w_b|²) + 0.5, after Sundaram, Brox
 * & Keutzer, ECCV 2010) and it is summarised (field-summary.ts). Files: motion/<t>.flo (forward, Middlebury),
 * motion/<t>.back.flo and motion/<t>.png, the forward field in the flow colour wheel (Baker et al., IJCV 2011).
 * Pictures share one scale per clip (clipMotionScale) so they compare within the clip: the first pass computes and
 * stores the fields, the second colours them. Both passes run in the thread pool.
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

    const estimated = await forEachFrame(runs.length, share(context, 0, FIELDS_SHARE), (r, signal) => {
      const { first, pairs } = runs[r]!;
      const from = Array.from({ length: pairs }, (_, k) => first + k);
      return pool.estimateMotionRun(
        {
          frameFiles: [...from, first + pairs].map(layout.frame),
          estimator,
          params,
          forwardFiles: from.map(work.layout.motionFlo),
          backwardFiles: from.map(work.layout.motionBackwardFlo),
        },
        signal,
      );
    });
    const fields = runs.flatMap((run, r) => estimated[r]!.map((pair, k) => ({ fromIndex: run.first + k, ...pair })));
    const cuts = new Set(frames.filter((frame) => frame.cutBefore).map((frame) => frame.index));
    const maxMotion =
      clipMotionScale(
        fields.map((f) => ({ fromIndex: f.fromIndex, ...f.forward })),
        cuts,
      )?.pxPerStep ?? 0;
    await forEachFrame(fields.length, share(context, FIELDS_SHARE, 1 - FIELDS_SHARE), (i, signal) => {
      const { fromIndex } = fields[i]!;
      return pool.writeMotionPicture(
        {
          floFile: work.layout.motionFlo(fromIndex),
          pictureFile: work.layout.motionPicture(fromIndex),
          maxMotion,
        },
        signal,
      );
    });

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

/** A pass's progress as a part of the stage's. */
function share(context: StageContext, from: number, size: number): Pick<StageContext, 'signal' | 'progress'> {
  return { signal: context.signal, progress: (done) => context.progress(from + done * size) };
}
