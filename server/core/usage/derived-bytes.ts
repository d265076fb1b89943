import fs from 'node:fs';
import type { ClipProbe } from '../../../shared/types/clips';
import { storedFrameBytes } from '../media/ffmpeg';
import { workingFrameSize } from '../media/frame-size';

/**
 * What processing a clip will add to the disk, predicted before any of it exists, so admission can hold it against
 * the quotas (DESIGN §4: a clip's derived bytes count). Frames are most of it and their size depends on the
 * footage (a dark or fogged clip compresses several times better than a sharp sunlit one), so a few frames are
 * encoded exactly as the sample stage stores them and their mean size stands for every frame. The rest is bytes per
 * working pixel, measured by `npm run bench:storage` on generated footage at project defaults (docs/benchmarks.md):
 * packed forward fields (one per neighbour pair), the H.264 preview per second of footage, one thumbnail.
 * Processing replaces the prediction with the measured bytes.
 */
export const DERIVED_BYTES_MODEL = {
  /** Used only when no frame could be sampled. */
  frameBytesPerPixel: 1.6,
  fieldBytesPerPixel: 0.2,
  previewBytesPerPixelSecond: 0.25,
  thumbnailBytes: 6_000,
} as const;

/** Where in the clip the frames are sampled, as shares of its duration. */
const SAMPLE_AT = [1 / 6, 1 / 2, 5 / 6] as const;
const SAMPLE_TIMEOUT_MS = 20_000;

export interface DerivedBytesSettings {
  sampleFps: number;
  workingSize: number;
}

type SizedProbe = Pick<ClipProbe, 'durationS' | 'width' | 'height' | 'rotation'>;

/**
 * What a clip holds against the quotas while its processing is unfinished: its files so far, or its source plus the
 * derived bytes predicted at admission, whichever is more; once processed, its files alone.
 */
export function heldBytes(
  clip: { sizeBytes: number; predictedDerivedBytes?: number | null },
  onDisk: number,
  processed: boolean,
): number {
  if (processed) return onDisk;
  return Math.max(onDisk, Number(clip.sizeBytes) + Number(clip.predictedDerivedBytes ?? 0));
}

/** Pure arithmetic of the prediction, given the sampled frames' bytes (empty: the per-pixel fallback). */
export function predictDerivedBytes(
  probe: SizedProbe,
  { sampleFps, workingSize }: DerivedBytesSettings,
  sampledFrameBytes: readonly number[] = [],
): number {
  const { width, height } = workingFrameSize(probe.width, probe.height, probe.rotation, workingSize);
  const pixels = width * height;
  const frames = Math.max(1, Math.ceil(probe.durationS * sampleFps));
  const model = DERIVED_BYTES_MODEL;
  const frameBytes = sampledFrameBytes.length
    ? sampledFrameBytes.reduce((sum, bytes) => sum + bytes, 0) / sampledFrameBytes.length
    : pixels * model.frameBytesPerPixel;
  return Math.round(
    frames * frameBytes +
      (frames - 1) * pixels * model.fieldBytesPerPixel +
      probe.durationS * pixels * model.previewBytesPerPixelSecond +
      model.thumbnailBytes,
  );
}

/** Samples a few frames of the uploaded file (ffmpeg in child processes, never on the event loop) and predicts. */
export async function predictDerivedBytesOf(
  file: string,
  probe: SizedProbe,
  settings: DerivedBytesSettings,
): Promise<number> {
  // The file must be here: without it every sample fails and the prediction would quietly fall back to the rough
  // per-pixel estimate.
  await fs.promises.access(file, fs.constants.R_OK);
  const size = workingFrameSize(probe.width, probe.height, probe.rotation, settings.workingSize);
  const samples = await Promise.all(
    SAMPLE_AT.map((share) =>
      storedFrameBytes(file, share * probe.durationS, size, SAMPLE_TIMEOUT_MS).catch((error: unknown) => {
        // A seek that decodes nothing (a damaged middle, say) leaves this sample out; the others still count.
        console.warn(`Kinefold: no frame sampled at ${Math.round(share * 100)} % for the prediction: ${error}`);
        return 0;
      }),
    ),
  );
  return predictDerivedBytes(
    probe,
    settings,
    samples.filter((bytes) => bytes > 0),
  );
}
