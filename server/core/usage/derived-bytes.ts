import type { ClipProbe } from '../../../shared/types/clips';
import { workingFrameSize } from '../media/frame-size';

/**
 * What processing a clip will add to the disk, predicted from its probe and the project's settings before any of
 * it exists, so admission can hold it against the quotas (DESIGN §4: a clip's derived bytes count). Each kind is
 * bytes per pixel of the working size, measured by `npm run bench:storage` on generated footage at project
 * defaults (docs/benchmarks.md): lossless WebP frames, packed forward fields (one per neighbour pair), the H.264
 * preview per second of footage, and one thumbnail. Processing replaces the prediction with the measured bytes.
 */
export const DERIVED_BYTES_MODEL = {
  frameBytesPerPixel: 1.6,
  fieldBytesPerPixel: 0.3,
  previewBytesPerPixelSecond: 0.5,
  thumbnailBytes: 6_000,
} as const;

export interface DerivedBytesSettings {
  sampleFps: number;
  workingSize: number;
}

export function predictDerivedBytes(
  probe: Pick<ClipProbe, 'durationS' | 'width' | 'height' | 'rotation'>,
  { sampleFps, workingSize }: DerivedBytesSettings,
): number {
  const { width, height } = workingFrameSize(probe.width, probe.height, probe.rotation, workingSize);
  const pixels = width * height;
  const frames = Math.max(1, Math.ceil(probe.durationS * sampleFps));
  const model = DERIVED_BYTES_MODEL;
  return Math.round(
    frames * pixels * model.frameBytesPerPixel +
      (frames - 1) * pixels * model.fieldBytesPerPixel +
      probe.durationS * pixels * model.previewBytesPerPixelSecond +
      model.thumbnailBytes,
  );
}
