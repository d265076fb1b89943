/**
 * The per-frame work of the pipeline, run in the worker-thread pool: read a sampled frame and measure it. The
 * computations are the pure functions of shared/ and worker/signals/.
 */
import { rgbToGrey } from '../../shared/colour/grey';
import { readRgbImage } from '../../server/core/media/frame-images';
import { cutThumb, type CutThumb } from '../signals/cut-evidence';
import { greyHistogram } from '../signals/cuts';
import { frameSignals, type FrameSignals } from '../signals/frame-signals';
import { hashToHex } from '../../shared/review/hash-bits';
import { appearanceDescriptor } from '../signals/moment-descriptor';
import { dHash } from '../signals/perceptual-hash';

export interface MeasureFrameTask {
  kind: 'measure';
  frameFile: string;
  cutBins: number;
  /** Whether to make the cut detector's thumbs (off only for the cost benchmark's reference runs). */
  cutThumb: boolean;
}

export interface FrameMeasurement {
  signals: FrameSignals;
  /** Grey histogram for cut detection between this frame and its neighbours. */
  histogram: Float64Array;
  /** dHash as 16 hex digits. */
  dhash: string;
  /** Small copies for the cut detector's motion and edge evidence; null when not asked for. */
  cutThumb: CutThumb | null;
  /** The appearance part of the moment descriptor (shared/diversity/descriptor-layout.ts). */
  appearance: Float32Array;
}

export type FrameTask = MeasureFrameTask;

export async function measureFrame({
  frameFile,
  cutBins,
  cutThumb: withThumb,
}: MeasureFrameTask): Promise<FrameMeasurement> {
  const { rgb, width, height } = await readRgbImage(frameFile);
  const grey = rgbToGrey(rgb, new Float32Array(width * height));
  const signals = frameSignals(grey, width, height);
  return {
    signals,
    histogram: greyHistogram(grey, cutBins),
    dhash: hashToHex(dHash(grey, width, height)),
    cutThumb: withThumb ? cutThumb(grey, width, height) : null,
    appearance: appearanceDescriptor(rgb, grey, width, height, signals.sharpness),
  };
}
