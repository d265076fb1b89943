import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import { Clip, Job } from '../../server/core/models';
import { probeUpload } from '../../server/core/media/clip-probe';
import { createProject } from '../../server/core/projects/projects';
import { storagePaths } from '../../server/core/storage/paths';
import type { ProjectBody } from '../../shared/schemas/projects';
import type { TestServer } from './test-server';

const run = promisify(execFile);

/** The generated test picture: ffmpeg's moving colour pattern with a clock, at 320×240 and 25 frames/s. */
export const TEST_PATTERN = 'testsrc2=size=320x240:rate=25';

/** Makes an H.264 MP4 from lavfi sources with the bundled ffmpeg; `args` come between the inputs and the codec. */
export async function makeClip(file: string, inputs: string[], args: string[] = []): Promise<string> {
  const sources = inputs.flatMap((input) => ['-f', 'lavfi', '-i', input]);
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    ...sources,
    ...args,
    '-c:v',
    'libx264',
    '-preset',
    'veryfast',
    '-pix_fmt',
    'yuv420p',
    '-movflags',
    '+faststart',
    file,
  ]);
  return file;
}

/** The test pattern for `durationS` seconds, through an optional filter. */
export function makePatternClip(file: string, durationS: number, filter?: string, extra: string[] = []) {
  return makeClip(file, [`${TEST_PATTERN}:duration=${durationS}`], [...(filter ? ['-vf', filter] : []), ...extra]);
}

/** Encodes an existing clip again at another quality: other bytes, the same pictures. */
export async function reencode(source: string, file: string, crf: number): Promise<string> {
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-i',
    source,
    '-c:v',
    'libx264',
    '-crf',
    String(crf),
    '-pix_fmt',
    'yuv420p',
    '-movflags',
    '+faststart',
    file,
  ]);
  return file;
}

/** The same stream in a new file whose metadata says to show it turned by `degrees` (as phones record). */
export async function withRotation(source: string, file: string, degrees: number): Promise<string> {
  await run(ffmpegInstaller.path, [
    '-v',
    'error',
    '-y',
    '-i',
    source,
    '-c',
    'copy',
    '-metadata:s:v:0',
    `rotate=${degrees}`,
    file,
  ]);
  return file;
}

/** Overwrites everything after the first `keep` share of a file with zeros: it still probes, then stops decoding. */
export function damageSecondPart(source: string, file: string, keep = 0.5): string {
  const bytes = fs.readFileSync(source);
  bytes.fill(0, Math.floor(bytes.length * keep));
  fs.writeFileSync(file, bytes);
  return file;
}

export async function addProject(actorId: number, name: string, settings: Partial<ProjectBody> = {}) {
  return createProject({ name, ...settings }, actorId);
}

/**
 * A clip as upload admission leaves it: the probed row, the source in the clip's folder and a queued process-clip
 * job. The source is copied in directly, so a file that probes but is damaged can be tried as well.
 */
export async function insertClip(server: TestServer, file: string, projectId: number, uploaderId: number) {
  const { probe, ext } = await probeUpload(file, path.basename(file));
  const bytes = fs.readFileSync(file);
  const clip = await Clip.create({
    projectId,
    uploaderId,
    originalName: path.basename(file),
    sizeBytes: bytes.length,
    storedBytes: bytes.length,
    sha256: createHash('sha256').update(bytes).digest('hex'),
    sourceExt: ext,
    state: 'queued',
    ...probe,
    site: '',
    rig: '',
    capturedAt: null,
    tags: [],
    notes: '',
  });
  const paths = storagePaths(server.storageDir);
  fs.mkdirSync(paths.clipDir(clip.id), { recursive: true });
  fs.copyFileSync(file, paths.clipSource(clip.id, ext));
  const job = await Job.create({
    kind: 'process-clip',
    clipId: clip.id,
    payload: { clipId: clip.id },
    state: 'queued',
    runAfter: new Date(),
  });
  return { clip, job };
}

/** Names left in a clip folder by work in flight (they must all be gone once a job has settled). */
export function workFolders(server: TestServer, clipId: number): string[] {
  const dir = storagePaths(server.storageDir).clipDir(clipId);
  return fs.existsSync(dir) ? fs.readdirSync(dir).filter((name) => name.startsWith('work-')) : [];
}
