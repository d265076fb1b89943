import fs from 'node:fs';
import { Clip, Frame, MotionField } from '../../server/core/models';
import { FinalJobError } from '../jobs/job-errors';
import {
  encodePreview,
  MediaError,
  probeMedia,
  sampleFrames,
  type RunOptions,
  type SampledFrames,
} from '../../server/core/media/ffmpeg';
import { writeThumbnail } from '../../server/core/media/frame-images';
import { removeStoredViews } from '../../server/core/storage/original-format';
import { workingFrameSize } from '../../server/core/media/frame-size';
import type { PipelineStage, StageContext } from './stage';

/** ffmpeg gets this long plus some seconds per second of footage before it is taken for hung. */
const MEDIA_TIMEOUT_BASE_MS = 120_000;
const MEDIA_TIMEOUT_PER_SECOND_MS = 20_000;
const PROBE_TIMEOUT_MS = 30_000;
/** Share of the stage's progress the frames take; the preview takes the rest. */
const FRAMES_SHARE = 0.5;
/** Footage that stops decoding more than this (or two sample steps) before its end counts as damaged. */
const DECODE_SHORTFALL_S = 1;

/**
 * sample: frames at the project's rate and working size (lossless WebP), a browser-playable preview, a thumbnail.
 * Frames come first: a file that cannot be decoded fails here before time goes into a preview. The grey copy for
 * estimation, and the luma and chroma views, are derived from the frame itself: lossless, so what is computed from
 * it is the same every time it is read. The new frames put the clip in the packed format (storage/paths.ts); views
 * an earlier processing stored are removed, as nothing reads them any more.
 */
export const sampleStage: PipelineStage = {
  name: 'sample',
  async run(context) {
    const { clip, settings, paths } = context;
    const source = paths.clipSource(clip.id, clip.sourceExt);
    const size = workingFrameSize(clip.width, clip.height, clip.rotation, settings.workingSize);
    const work = await context.workDir();
    await fs.promises.mkdir(work.layout.framesDir, { recursive: true });
    await fs.promises.mkdir(work.layout.thumbsDir, { recursive: true });
    const media = (from: number, share: number): RunOptions => ({
      durationS: clip.durationS,
      timeoutMs: MEDIA_TIMEOUT_BASE_MS + clip.durationS * MEDIA_TIMEOUT_PER_SECOND_MS,
      signal: context.signal,
      onProgress: (done) => context.progress(from + done * share),
    });

    // A clip shorter than one sampling step (a single frame, a blink of the trigger) still gives its first frame.
    const keepLast = clip.durationS * settings.sampleFps < 1;
    const sampled = await readable(() =>
      sampleFrames(
        source,
        work.layout.framePattern,
        { fps: settings.sampleFps, size, keepLast },
        media(0, FRAMES_SHARE),
      ),
    );
    const timesS = await checkFrames(sampled, work.layout.framesDir, await videoDurationS(source, clip), context);
    await readable(() => encodePreview(source, work.layout.preview, size, media(FRAMES_SHARE, 1 - FRAMES_SHARE)));
    await writeThumbnail(work.layout.frame(Math.floor(timesS.length / 2)), work.layout.thumbnail);

    await work.moveIntoPlace(paths.clipDerived(clip.id), ['framesDir', 'preview', 'thumbsDir']);
    await removeStoredViews(paths.clipDir(clip.id));
    await context.commit(async (transaction) => {
      await Frame.destroy({ where: { clipId: clip.id }, transaction });
      await Frame.bulkCreate(
        timesS.map((timeS, index) => ({ clipId: clip.id, index, timeS })),
        { transaction },
      );
      // Fields of the old frames do not describe the new ones; the Motion stage makes them again.
      await MotionField.destroy({ where: { clipId: clip.id }, transaction });
      // New frames make earlier signals, counts and flags stale until the later stages measure them again.
      await Clip.update(
        {
          frameCount: timesS.length,
          derivedFormat: 'packed',
          hasPreview: true,
          hasThumbnail: true,
          cutCount: null,
          medianSharpness: null,
          meanLuma: null,
          flags: [],
          flagDetails: [],
        },
        { where: { id: clip.id }, transaction },
      );
    });
  },
};

/** An ffmpeg refusal of the input is final; a killed or timed-out ffmpeg may do better on another try. */
async function readable<T>(step: () => Promise<T>): Promise<T> {
  try {
    return await step();
  } catch (error) {
    if (error instanceof MediaError && error.signal === null) {
      throw new FinalJobError(
        `ffmpeg cannot read this file (${error.message.replace(/^ffmpeg failed: /, '')}). ` +
          'Export or copy it again from the camera and upload it anew.',
      );
    }
    throw error;
  }
}

/** The video stream's own duration where the container gives one: a longer sound track must not count. */
async function videoDurationS(source: string, clip: Clip): Promise<number> {
  const probe = await probeMedia(source, PROBE_TIMEOUT_MS);
  const video = probe.streams.find((stream) => stream.codec_type === 'video');
  const duration = Number(video?.duration);
  return Number.isFinite(duration) && duration > 0 ? duration : clip.durationS;
}

/** Every frame file has its time, and the frames reach the end of the footage: otherwise the file is damaged. */
async function checkFrames(
  sampled: SampledFrames,
  framesDir: string,
  durationS: number,
  { settings }: Pick<StageContext, 'settings'>,
): Promise<number[]> {
  const { timesS, problems } = sampled;
  const reason = problems[0] ? ` (ffmpeg: ${problems[0].replace(/^\[[^\]]*\]\s*/, '')})` : '';
  if (timesS.length === 0) {
    throw new FinalJobError(
      `No frame of this file could be decoded${reason}. Export or copy it again from the ` +
        'camera and upload it anew.',
    );
  }
  const files = (await fs.promises.readdir(framesDir)).length;
  if (files !== timesS.length || timesS.findIndex((time) => time === undefined) !== -1) {
    throw new Error(`ffmpeg wrote ${files} frames but reported the times of ${timesS.length}`);
  }
  const decodedS = timesS[timesS.length - 1]! + 1 / settings.sampleFps;
  if (decodedS < durationS - Math.max(DECODE_SHORTFALL_S, 2 / settings.sampleFps)) {
    throw new FinalJobError(
      `Only the first ${decodedS.toFixed(1)} s of ${durationS.toFixed(1)} s could be decoded` +
        `${reason}; the file is damaged. Export or copy it again from the camera and upload it anew.`,
    );
  }
  return timesS;
}
