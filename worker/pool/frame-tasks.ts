/**
 * The per-frame work of the pipeline, run in the worker-thread pool: read a sampled frame, measure it, or write its
 * luma and chroma views. The computations are the pure functions of shared/ and worker/signals/.
 */
import { rgbToGrey } from '../../shared/colour/grey';
import { rgbImageToLab } from '../../shared/colour/srgb-lab';
import { encodeChroma, encodeLuma } from '../../shared/colour/view-encoding';
import { readRgbImage, writeGreyPng, writeRgb16Png } from '../media/frame-images';
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
}

export interface FrameMeasurement {
  signals: FrameSignals;
  /** Grey histogram for cut detection between this frame and its neighbours. */
  histogram: Float64Array;
  /** dHash as 16 hex digits. */
  dhash: string;
  /** Small copies for the cut detector's motion and edge evidence. */
  cutThumb: CutThumb;
  /** The appearance part of the moment descriptor (shared/diversity/descriptor-layout.ts). */
  appearance: Float32Array;
}

export interface FrameViewsTask {
  kind: 'views';
  frameFile: string;
  lumaFile: string;
  chromaFile: string;
}

export type FrameTask = MeasureFrameTask | FrameViewsTask;

export async function measureFrame({ frameFile, cutBins }: MeasureFrameTask): Promise<FrameMeasurement> {
  const { rgb, width, height } = await readRgbImage(frameFile);
  const grey = rgbToGrey(rgb, new Float32Array(width * height));
  const signals = frameSignals(grey, width, height);
  return {
    signals,
    histogram: greyHistogram(grey, cutBins),
    dhash: hashToHex(dHash(grey, width, height)),
    cutThumb: cutThumb(grey, width, height),
    appearance: appearanceDescriptor(rgb, grey, width, height, signals.sharpness),
  };
}

/** Luma (L*) and chroma (a*, b*) of the frame, stored as DESIGN §7 says (see view-encoding.ts). */
export async function writeFrameViews({ frameFile, lumaFile, chromaFile }: FrameViewsTask): Promise<void> {
  const { rgb, width, height } = await readRgbImage(frameFile);
  const pixels = width * height;
  const lab = { l: new Float32Array(pixels), a: new Float32Array(pixels), b: new Float32Array(pixels) };
  rgbImageToLab(rgb, lab);
  await Promise.all([
    writeGreyPng(encodeLuma(lab.l), width, height, lumaFile),
    writeRgb16Png(encodeChroma(lab.a, lab.b), width, height, chromaFile),
  ]);
}
