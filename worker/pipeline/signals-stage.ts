import { Clip, Frame, MomentDescriptor } from '../../server/core/models';
import { floatBlob } from '../../server/core/models/moment-descriptor.model';
import { detectClipCuts } from './cut-detection';
import { forEachFrame } from './each-frame';
import type { PipelineStage, StageContext } from './stage';

/**
 * signals: per-frame mean luma, RMS contrast, variance of the Laplacian and clipped shares (frame-signals.ts), the
 * frame's dHash (perceptual-hash.ts), and cuts (cut-detection.ts): histogram distance (cuts.ts), edge change and
 * a coarse motion verdict (cut-evidence.ts), decided against the clip's own local level (cut-decision.ts), with
 * curators' cut marks overriding the detector; and the appearance part of each moment's descriptor (colour, gradient
 * orientation, sharpness: moment-descriptor.ts), whose motion part the motion stage adds. `cutEvidence: false`
 * leaves out the thumbs and pair evidence, so cuts come from the histogram alone: only the cost benchmark's
 * reference runs ask for that (bench/cut-realtime.ts).
 */
export function createSignalsStage({ cutEvidence }: { cutEvidence: boolean }): PipelineStage {
  return {
    name: 'signals',
    run: (context) => runSignals(context, cutEvidence),
  };
}

async function runSignals(context: StageContext, cutEvidence: boolean): Promise<void> {
  const { clip, settings, pool, paths } = context;
  const frames = await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] });
  const layout = paths.clipDerived(clip.id);
  const measured = await forEachFrame(frames.length, context, (index, signal) =>
    pool.measureFrame({ frameFile: layout.frame(index), cutBins: settings.cutBins, cutThumb: cutEvidence }, signal),
  );
  const cuts = await detectClipCuts(clip.id, measured, settings.cutThreshold, context);
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
      cutScore: cuts.histogramDistances[index]!,
      cutEvidence: cuts.evidence[index]!,
      dhash,
    };
  });
  await context.commit(async (transaction) => {
    await Frame.destroy({ where: { clipId: clip.id }, transaction });
    await Frame.bulkCreate(rows, { transaction });
    await MomentDescriptor.upsert(
      {
        clipId: clip.id,
        frameCount: rows.length,
        appearance: floatBlob(measured.map((frame) => frame.appearance)),
        motion: null,
      },
      { transaction },
    );
    await Clip.update(
      {
        cutCount: countTransitions(cuts.cutBefore),
        medianSharpness: median(rows.map((row) => row.sharpness)),
        meanLuma: rows.reduce((sum, row) => sum + row.meanLuma, 0) / Math.max(1, rows.length),
      },
      { where: { id: clip.id }, transaction },
    );
  });
}

/** Runs of consecutive frames with a cut before them: a fade or dissolve is one transition, however long. */
function countTransitions(cutBefore: readonly boolean[]): number {
  return cutBefore.filter((cut, k) => cut && !cutBefore[k - 1]).length;
}

function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}
