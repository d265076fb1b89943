import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import ffprobeInstaller from '@ffprobe-installer/ffprobe';
import ffmpeg, { type FfmpegCommand } from 'fluent-ffmpeg';

/**
 * The one wrapper around ffmpeg and ffprobe: options in, promise out, stderr attached to errors.
 * It knows nothing of jobs, clips or the database.
 */

const run = promisify(execFile);
const MAX_OUTPUT = 16 * 1024 * 1024;

export class MediaError extends Error {
  /** `signal`: the process was killed (by us on a timeout, or by the system), not refused by its input. */
  constructor(
    message: string,
    readonly stderr = '',
    readonly signal: string | null = null,
  ) {
    super(message);
    this.name = 'MediaError';
  }
}

export interface ProbeStream {
  codec_type?: string;
  codec_name?: string;
  width?: number;
  height?: number;
  avg_frame_rate?: string;
  r_frame_rate?: string;
  duration?: string;
  nb_frames?: string;
  tags?: Record<string, string>;
  side_data_list?: { rotation?: number | string }[];
  disposition?: { attached_pic?: number };
}

export interface ProbeResult {
  format: { format_name?: string; duration?: string; size?: string; probe_score?: number };
  streams: ProbeStream[];
}

/**
 * Runs ffprobe with a time limit. fluent-ffmpeg's ffprobe() cannot be killed, so a damaged file that hangs the
 * demuxer would hold an upload forever; execFile's timeout kills it.
 */
export async function probeMedia(file: string, timeoutMs: number): Promise<ProbeResult> {
  try {
    const { stdout } = await run(
      ffprobeInstaller.path,
      ['-v', 'error', '-print_format', 'json', '-show_format', '-show_streams', file],
      { timeout: timeoutMs, maxBuffer: MAX_OUTPUT, killSignal: 'SIGKILL' },
    );
    return JSON.parse(stdout) as ProbeResult;
  } catch (error) {
    const failed = error as { killed?: boolean; stderr?: string; message: string };
    if (failed.killed) throw new MediaError(`ffprobe took longer than ${timeoutMs} ms`, failed.stderr);
    throw new MediaError(`ffprobe failed: ${firstLine(failed.stderr) || failed.message}`, failed.stderr ?? '');
  }
}

/** Decodes the first video frame, proving the stream is really decodable (a header alone can lie). */
export async function decodeFirstFrame(file: string, timeoutMs: number): Promise<void> {
  try {
    // framecrc prints one line per decoded frame, so an empty listing means nothing could be decoded.
    const { stdout, stderr } = await run(
      ffmpegInstaller.path,
      ['-v', 'error', '-nostdin', '-i', file, '-map', '0:v:0', '-frames:v', '1', '-f', 'framecrc', '-'],
      { timeout: timeoutMs, maxBuffer: MAX_OUTPUT, killSignal: 'SIGKILL' },
    );
    if (!stdout.split('\n').some((line) => line.trim() && !line.startsWith('#'))) {
      throw new MediaError(`ffmpeg decoded no frame${stderr ? `: ${firstLine(stderr)}` : ''}`, stderr);
    }
  } catch (error) {
    if (error instanceof MediaError) throw error;
    const failed = error as { killed?: boolean; stderr?: string; message: string };
    if (failed.killed) throw new MediaError(`decoding took longer than ${timeoutMs} ms`, failed.stderr);
    throw new MediaError(
      `ffmpeg could not decode a frame: ${firstLine(failed.stderr) || failed.message}`,
      failed.stderr,
    );
  }
}

/**
 * Lossless WebP at libwebp's fastest method, as frames are stored: measured on demo footage (bench:storage), a third
 * smaller than PNG and quicker to write; higher methods save a further 6 % at three times the time.
 */
const LOSSLESS_WEBP = ['-c:v', 'libwebp', '-lossless', '1', '-compression_level', '0', '-pix_fmt', 'bgra'];

/**
 * Bytes of the frame at `atS` seconds as the sample stage would store it (scaled to `size`, lossless WebP): a
 * sample of how well this footage compresses, for the admission's prediction of its derived bytes. Seeks before
 * the input, so it decodes from the nearest key frame only.
 */
export async function storedFrameBytes(file: string, atS: number, size: FrameSize, timeoutMs: number) {
  const { stdout } = await run(
    ffmpegInstaller.path,
    [
      ...['-v', 'error', '-nostdin', '-ss', atS.toFixed(3), '-i', file, '-map', '0:v:0', '-frames:v', '1'],
      ...['-vf', `scale=${size.width}:${size.height}`, ...LOSSLESS_WEBP, '-f', 'webp', '-'],
    ],
    { timeout: timeoutMs, maxBuffer: MAX_OUTPUT, killSignal: 'SIGKILL', encoding: 'buffer' },
  );
  return stdout.length;
}

function firstLine(text: string | undefined): string {
  return (text ?? '').trim().split('\n')[0] ?? '';
}

ffmpeg.setFfmpegPath(ffmpegInstaller.path);
ffmpeg.setFfprobePath(ffprobeInstaller.path);

export interface RunOptions {
  /** Length of the input in seconds, to turn ffmpeg's time mark into the share done. */
  durationS: number;
  /** Called with the share done, 0..1, never going back. */
  onProgress?: (share: number) => void;
  /** Aborting kills ffmpeg; the promise then rejects with the signal's reason. */
  signal?: AbortSignal;
  /** ffmpeg is killed after this long, so a file that hangs the decoder cannot hold a worker forever. */
  timeoutMs: number;
}

/** Output size in pixels, after rotation. */
export interface FrameSize {
  width: number;
  height: number;
}

export interface SampledFrames {
  /** Presentation time in seconds of each written frame, by frame number (files are numbered from 0). */
  timesS: number[];
  /** ffmpeg's complaints about the input (decoding errors, invalid data), at most a few. */
  problems: string[];
}

const MAX_PROBLEMS = 10;
/** showinfo prints one line per frame leaving the filter graph: `n:   3 pts:  15360 pts_time:0.6 …`. */
const SHOWINFO_LINE = /Parsed_showinfo.*\bn:\s*(\d+)\s+pts:\s*-?\d+\s+pts_time:(-?[\d.]+(?:e[-+]?\d+)?)/;
const PROBLEM_LINE = /error|invalid|corrupt|missing|truncat/i;
const COMMON_OUTPUT = ['-map', '0:v:0', '-an', '-sn', '-dn'];

/**
 * A browser-playable preview: H.264 in MP4, yuv420p (what browsers decode), the index first (faststart) so playback
 * starts before the whole file has arrived. Rotation metadata is applied by ffmpeg's default autorotate.
 */
export async function encodePreview(source: string, output: string, size: FrameSize, options: RunOptions) {
  const command = ffmpeg(source, { timeout: options.timeoutMs / 1000 })
    .inputOptions(['-nostdin'])
    .videoFilters([`scale=${size.width}:${size.height}`, 'setsar=1'])
    .videoCodec('libx264')
    .outputOptions([
      ...COMMON_OUTPUT,
      '-preset',
      'veryfast',
      '-crf',
      '23',
      '-pix_fmt',
      'yuv420p',
      '-movflags',
      '+faststart',
    ])
    .format('mp4')
    .output(output);
  await runCommand(command, options);
}

/**
 * Frames at `fps` per second of the input's timeline as lossless WebP files named by `pattern` (`%06d` numbered
 * from 0).
 * The fps filter picks frames by their timestamps, so variable-frame-rate input is sampled evenly in time;
 * showinfo reports the time of each frame written, and passthrough keeps the muxer from adding or dropping any.
 * `keepLast` is for footage shorter than one step, which would otherwise give no frame.
 */
export async function sampleFrames(
  source: string,
  pattern: string,
  { fps, size, keepLast = false }: { fps: number; size: FrameSize; keepLast?: boolean },
  options: RunOptions,
): Promise<SampledFrames> {
  const timesS: number[] = [];
  const problems: string[] = [];
  // The fps filter rounds the end of the input to its own steps, so footage shorter than half a step yields no
  // frame at all; `eof_action=pass` lets the last (here: only) frame through (FFmpeg filters manual, fps).
  const fpsFilter = keepLast ? `fps=${fps}:eof_action=pass` : `fps=${fps}`;
  const command = ffmpeg(source, { timeout: options.timeoutMs / 1000 })
    .inputOptions(['-nostdin'])
    .videoFilters([fpsFilter, `scale=${size.width}:${size.height}`, 'setsar=1', 'showinfo'])
    .outputOptions([...COMMON_OUTPUT, '-vsync', 'passthrough', ...LOSSLESS_WEBP, '-start_number', '0'])
    .format('image2')
    .output(pattern);
  command.on('stderr', (line: string) => {
    const frame = SHOWINFO_LINE.exec(line);
    if (frame) timesS[Number(frame[1])] = Number(frame[2]);
    else if (PROBLEM_LINE.test(line) && problems.length < MAX_PROBLEMS) problems.push(line.trim());
  });
  await runCommand(command, options);
  return { timesS, problems };
}

function runCommand(command: FfmpegCommand, { durationS, onProgress, signal }: RunOptions): Promise<void> {
  return new Promise((resolve, reject) => {
    if (signal?.aborted) {
      reject(signal.reason);
      return;
    }
    const kill = () => command.kill('SIGKILL');
    signal?.addEventListener('abort', kill, { once: true });
    let done = 0;
    command.on('progress', ({ timemark }: { timemark: string }) => {
      const share = clampShare(timemarkSeconds(timemark) / durationS);
      if (share > done) {
        done = share;
        onProgress?.(share);
      }
    });
    command.on('error', (error: Error, _stdout: string | null, stderr: string | null) => {
      signal?.removeEventListener('abort', kill);
      reject(signal?.aborted ? signal.reason : mediaError(error, stderr ?? ''));
    });
    command.on('end', () => {
      signal?.removeEventListener('abort', kill);
      if (done < 1) onProgress?.(1);
      resolve();
    });
    command.run();
  });
}

/** fluent-ffmpeg says "killed with signal X", "ran into a timeout" or "exited with code N: <ffmpeg's reason>". */
function mediaError(error: Error, stderr: string): MediaError {
  const timedOut = /timeout/.test(error.message);
  const killed = /killed with signal (\w+)/.exec(error.message)?.[1] ?? (timedOut ? 'SIGKILL' : null);
  const reason = error.message.replace(/^ffmpeg exited with code \d+:\s*/, '').split('\n')[0] ?? '';
  return new MediaError(`ffmpeg failed: ${reason || firstLine(stderr)}`, stderr, killed);
}

function timemarkSeconds(timemark: string): number {
  const [h, m, s] = timemark.split(':').map(Number);
  return (h ?? 0) * 3600 + (m ?? 0) * 60 + (s ?? 0);
}

function clampShare(share: number): number {
  return Number.isFinite(share) ? Math.min(1, Math.max(0, share)) : 0;
}
