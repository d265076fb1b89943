import { Clip, Frame } from '../../server/core/models';
import { detectCuts } from '../signals/cuts';
import { forEachFrame } from './each-frame';
import type { PipelineStage } from './stage';

/**
 * signals: per-frame mean luma, RMS contrast, variance of the Laplacian and clipped shares (frame-signals.ts), the
 * frame's dHash (perceptual-hash.ts), and cuts from the correlation of grey histograms of neighbouring frames
 * (cuts.ts, after PySceneDetect's HistogramDetector) at the project's threshold.
 */
export const signalsStage: PipelineStage = {
  name: 'signals',
  async run(context) {
    const { clip, settings, pool, paths } = context;
    const frames = await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] });
    const layout = paths.clipDerived(clip.id);
    const measured = await forEachFrame(frames.length, context, (index, signal) =>
      pool.measureFrame({ frameFile: layout.frame(index), cutBins: settings.cutBins }, signal));
    const cuts = detectCuts(measured.map((m) => m.histogram), settings.cutThreshold);
    const rows = frames.map((frame, index) => {
      const { signals, dhash } = measured[index]!;
      return {
        clipId: clip.id,
        index: frame.index,
        timeS: frame.timeS,
        meanLuma: signals.meanLuma,
        contrast: signals.contrast,
        sharpness: signals.sharpness,
        clippedShare: signals.clippedShare,
        clippedHighShare: signals.clippedHighShare,
        cutBefore: cuts.cutBefore[index]!,
        cutScore: index > 0 ? cuts.scores[index - 1]! : null,
        dhash,
      };
    });
    await context.commit(async (transaction) => {
      await Frame.destroy({ where: { clipId: clip.id }, transaction });
      await Frame.bulkCreate(rows, { transaction });
      await Clip.update({
        cutCount: cuts.cutBefore.filter(Boolean).length,
        medianSharpness: median(rows.map((row) => row.sharpness)),
        meanLuma: rows.reduce((sum, row) => sum + row.meanLuma, 0) / Math.max(1, rows.length),
      }, { where: { id: clip.id }, transaction });
    });
  },
};

function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}
