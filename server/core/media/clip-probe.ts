import type { ClipProbe } from '../../../shared/types/clips';
import { HttpStatus } from '../../../shared/http-status';
import { AppError } from '../errors';
import { decodeFirstFrame, MediaError, probeMedia, type ProbeResult, type ProbeStream } from './ffmpeg';
import { startsLikeVideo } from './video-signature';

export const MIN_SIDE_PX = 16;
export const MAX_SIDE_PX = 8192;
/** Longer than a day is not field footage but a broken duration field. */
export const MAX_DURATION_S = 24 * 3600;
const PROBE_TIMEOUT_MS = 30_000;

/**
 * Below this, ffprobe is guessing from a few bytes: libavformat's AVPROBE_SCORE_RETRY (25, avformat.h [M]);
 * real containers recognised by content score 100.
 */
const MIN_PROBE_SCORE = 25;
const TEXT_FORMATS = /^(tty|srt|ass|webvtt|lrc|subviewer\d?|microdvd|jacosub|sami|mpl2|pjs|realtext|stl|vplayer)$/;
const STILL_IMAGE_CODECS = new Set(['png', 'mjpeg', 'jpegls', 'bmp', 'tiff', 'webp', 'gif', 'jpeg2000', 'qoi']);

/** Container families and the extension their source file is stored under (never the uploaded name's). */
const CONTAINER_EXTENSIONS: [pattern: RegExp, ext: string][] = [
  [/mp4|mov/, 'mp4'],
  [/webm/, 'webm'],
  [/matroska/, 'mkv'],
  [/avi/, 'avi'],
  [/mpegts/, 'ts'],
  [/mpeg/, 'mpg'],
  [/flv/, 'flv'],
  [/ogg/, 'ogv'],
];

export interface ProbedSource {
  probe: ClipProbe;
  ext: string;
}

/** A refusal in the operator's words; the tool's own output (paths, addresses) goes only to the server log. */
const refused = (message: string, cause?: unknown) =>
  new AppError(HttpStatus.UNPROCESSABLE_ENTITY, 'not_a_usable_video', message, undefined, cause);

/** What to say of a file the tools could not read: damaged when it starts like a video, else not a video. */
async function unreadable(file: string, displayName: string, cause: unknown): Promise<AppError> {
  return (await startsLikeVideo(file))
    ? refused(
        `${displayName} is damaged or incomplete (perhaps cut off while copying): Kinefold cannot read it. ` +
          'Copy or export it again from the camera.',
        cause,
      )
    : refused(`${displayName} is not a video file.`, cause);
}

/** Probes an upload and says in plain words why it cannot be used, or what it is. */
export async function probeUpload(file: string, displayName: string): Promise<ProbedSource> {
  let result: ProbeResult;
  try {
    result = await probeMedia(file, PROBE_TIMEOUT_MS);
  } catch (error) {
    if (error instanceof MediaError) throw await unreadable(file, displayName, error);
    throw error;
  }
  const formatName = result.format.format_name ?? '';
  // A text file can pass for "tty" (ANSI art) or, with a low score, for some rare format; neither is footage.
  if (TEXT_FORMATS.test(formatName) || (result.format.probe_score ?? 100) < MIN_PROBE_SCORE) {
    throw refused(`${displayName} is not a video file.`, `format ${formatName}, score ${result.format.probe_score}`);
  }
  const video = result.streams.find((stream) => stream.codec_type === 'video' && !stream.disposition?.attached_pic);
  if (!video) {
    const hasAudio = result.streams.some((stream) => stream.codec_type === 'audio');
    throw refused(
      hasAudio
        ? `${displayName} holds only sound: it has no video stream.`
        : `${displayName} is not a video file: it has no video stream.`,
    );
  }
  if (/image2|_pipe$/.test(formatName) || (STILL_IMAGE_CODECS.has(video.codec_name ?? '') && !isMovingPicture(video))) {
    throw refused(`${displayName} is a still image, not a video.`);
  }
  const width = video.width ?? 0;
  const height = video.height ?? 0;
  if (width < MIN_SIDE_PX || height < MIN_SIDE_PX || width > MAX_SIDE_PX || height > MAX_SIDE_PX) {
    throw refused(
      `${displayName} is ${width}×${height} px; Kinefold takes videos between ${MIN_SIDE_PX} and ` +
        `${MAX_SIDE_PX} px on each side.`,
    );
  }
  const durationS = Number(result.format.duration ?? video.duration ?? 0);
  if (!Number.isFinite(durationS) || durationS <= 0)
    throw refused(`${displayName} has no duration: it holds no footage.`);
  if (durationS > MAX_DURATION_S) {
    throw refused(`${displayName} claims to last ${Math.round(durationS / 3600)} hours; its header is damaged.`);
  }
  try {
    await decodeFirstFrame(file, PROBE_TIMEOUT_MS);
  } catch (error) {
    if (error instanceof MediaError) {
      throw refused(
        `${displayName} is damaged or incomplete: not one of its pictures can be decoded. ` +
          'Copy or export it again from the camera.',
        error,
      );
    }
    throw error;
  }
  return {
    probe: {
      container: formatName.split(',')[0] ?? formatName,
      codec: video.codec_name ?? 'unknown',
      durationS,
      fps: frameRate(video),
      width,
      height,
      rotation: rotationOf(video),
    },
    ext: CONTAINER_EXTENSIONS.find(([pattern]) => pattern.test(formatName))?.[1] ?? 'video',
  };
}

function isMovingPicture(video: ProbeStream): boolean {
  return Number(video.nb_frames ?? 0) > 1 || Number(video.duration ?? 0) > 0.5;
}

function parseRate(rate: string | undefined): number {
  const [num, den] = (rate ?? '0/0').split('/').map(Number);
  return num && den ? num / den : 0;
}

function frameRate(video: ProbeStream): number {
  return parseRate(video.avg_frame_rate) || parseRate(video.r_frame_rate);
}

/** Phones record upright video as landscape plus a rotation, in side data (newer) or a `rotate` tag (older). */
function rotationOf(video: ProbeStream): number {
  const fromSideData = video.side_data_list?.find((entry) => entry.rotation !== undefined)?.rotation;
  const degrees = Number(fromSideData ?? video.tags?.rotate ?? 0);
  return Number.isFinite(degrees) ? ((Math.round(degrees) % 360) + 360) % 360 : 0;
}
