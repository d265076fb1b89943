import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import ffprobeInstaller from '@ffprobe-installer/ffprobe';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Frame, Job, Project } from '../../server/core/models';
import { reprocessClip, viewImage } from '../../server/core/clips/clip-media';
import { storagePaths } from '../../server/core/storage/paths';
import { decodeChroma, decodeLuma } from '../../shared/colour/view-encoding';
import {
  addProject,
  insertClip,
  makeClip,
  makePatternClip,
  withRotation,
  workFolders,
} from '../helpers/pipeline-clips';
import { closePipelineBed, startPipelineBed, type TestRuntime } from '../helpers/pipeline-runtime';
import type { TestServer } from '../helpers/test-server';
import { createFolderStore } from '../../server/core/storage/folder-store';

const probe = promisify(execFile);
const CLIP_S = 4;

let server: TestServer;
let worker: TestRuntime;
let adminId: number;
let gen: string;

beforeAll(async () => {
  ({ server, worker, adminId, gen } = await startPipelineBed());
});
afterAll(() => closePipelineBed({ server, worker }));

const paths = () => storagePaths(server.storageDir);

async function processNew(file: string, projectName: string, settings = {}) {
  const project = await addProject(adminId, projectName, settings);
  const { clip, job } = await insertClip(server, file, project.id, adminId);
  await worker.drain();
  return { clip: await clip.reload(), job: await job.reload(), project };
}

async function frameRows(clipId: number) {
  return Frame.findAll({ where: { clipId }, order: [['index', 'ASC']] });
}

/** Top-level MP4 boxes in file order (ISO/IEC 14496-12: each box starts with a 32-bit size and a 4-letter type). */
function topLevelBoxes(file: string): string[] {
  const bytes = fs.readFileSync(file);
  const types: string[] = [];
  for (let offset = 0; offset + 8 <= bytes.length;) {
    const size = bytes.readUInt32BE(offset);
    types.push(bytes.toString('latin1', offset + 4, offset + 8));
    if (size < 8) break;
    offset += size;
  }
  return types;
}

describe('process-clip on a clean clip', () => {
  let clip: Clip;
  let job: Job;
  const fps = 5;

  beforeAll(async () => {
    ({ clip, job } = await processNew(await makePatternClip(path.join(gen, 'clean.mp4'), CLIP_S), 'clean', {
      sampleFps: fps,
      workingSize: 320,
    }));
  });

  it('passes every stage and awaits review, with its job done on the first try', () => {
    expect(clip).toMatchObject({ state: 'awaiting_review', stage: null, error: null, frameCount: CLIP_S * fps });
    expect(job).toMatchObject({ state: 'done', attempts: 1, progress: 1, leaseOwner: null });
  });

  it('writes exactly one row per frame, at the time ffmpeg gave it, with every signal measured', async () => {
    const rows = await frameRows(clip.id);
    expect(rows.map((row) => row.index)).toEqual([...Array(CLIP_S * fps).keys()]);
    // The clip has a constant 25 frames/s, so the fps filter's frame n sits at n / fps.
    rows.forEach((row) => expect(row.timeS).toBeCloseTo(row.index / fps, 6));
    for (const row of rows) {
      expect([row.meanLuma, row.contrast, row.sharpness, row.clippedShare, row.dhash]).not.toContain(null);
    }
    expect(rows.filter((row) => row.cutBefore)).toHaveLength(0);
    expect(clip.cutCount).toBe(0);
  });

  it('keeps frames as lossless WebP at the working size, derives luma and chroma as DESIGN §7 stores them', async () => {
    const layout = paths().clipDerived(clip.id);
    expect(fs.readdirSync(layout.framesDir)).toHaveLength(clip.frameCount!);
    expect(await sharp(layout.frame(0)).metadata()).toMatchObject({ format: 'webp', width: 320, height: 240 });
    expect(fs.existsSync(path.join(paths().clipDir(clip.id), 'views'))).toBe(false);
    expect(await sharp(await viewImage(clip.id, 0, 'luma', createFolderStore(paths().root))).metadata()).toMatchObject({
      format: 'png',
      width: 320,
      height: 240,
      channels: 1,
      depth: 'uchar',
    });
    expect(
      await sharp(await viewImage(clip.id, 0, 'chroma', createFolderStore(paths().root))).metadata(),
    ).toMatchObject({
      format: 'png',
      width: 320,
      height: 240,
      channels: 3,
      depth: 'ushort',
    });
  });

  it('makes a browser-playable preview: H.264, yuv420p, index first, at the working size', async () => {
    const preview = paths().clipDerived(clip.id).preview;
    const { stdout } = await probe(ffprobeInstaller.path, [
      '-v',
      'error',
      '-select_streams',
      'v:0',
      '-show_entries',
      'stream=codec_name,pix_fmt,width,height',
      '-of',
      'json',
      preview,
    ]);
    expect(JSON.parse(stdout).streams[0]).toEqual({ codec_name: 'h264', pix_fmt: 'yuv420p', width: 320, height: 240 });
    const boxes = topLevelBoxes(preview);
    expect(boxes.indexOf('moov')).toBeGreaterThan(-1);
    expect(boxes.indexOf('moov')).toBeLessThan(boxes.indexOf('mdat'));
  });

  it('makes a thumbnail, counts the bytes on disk and leaves no work folder', async () => {
    expect(clip.toApi()).toMatchObject({ hasThumbnail: true, hasPreview: true, frameCount: clip.frameCount });
    expect((await sharp(paths().clipDerived(clip.id).thumbnail).metadata()).format).toBe('jpeg');
    const bytesOnDisk = (dir: string): number =>
      fs.readdirSync(dir, { withFileTypes: true }).reduce((sum, entry) => {
        const full = path.join(dir, entry.name);
        return sum + (entry.isDirectory() ? bytesOnDisk(full) : fs.statSync(full).size);
      }, 0);
    expect(Number(clip.storedBytes)).toBe(bytesOnDisk(paths().clipDir(clip.id)));
    expect(workFolders(server, clip.id)).toEqual([]);
  });

  it('records that the clip was processed, once', async () => {
    const events = await AuditEvent.findAll({ where: { targetType: 'clip', targetId: String(clip.id) } });
    expect(events.filter((event) => event.action === 'clip.processed')).toHaveLength(1);
  });
});

describe('views of a known colour', () => {
  // Source: the Lindbloom reference table as used by scikit-image's
  // test_colorconv.py::test_rgb2lab_brucelindbloom (CHECK-VALUES §5): sRGB red = L* 53.2408, a* 80.0925,
  // b* 67.2032. The clip goes through H.264 4:2:0, so the decoded red may be a few codes off pure red; the
  // tolerance allows for that (about 0.5 units of L*a*b* per code near red) on top of the storage rounding.
  const RED_LAB = { l: 53.2408, a: 80.0925, b: 67.2032 };
  const MAX_CODE_DEVIATION = 3;
  const LAB_TOLERANCE = 1.5;

  it('stores L* × 2.55 in the luma PNG and (c + 128) × 256 of a*, b* in the chroma PNG', async () => {
    const file = await makeClip(path.join(gen, 'red.mp4'), ['color=c=red:size=320x240:rate=25:duration=1']);
    const { clip } = await processNew(file, 'red');
    const layout = paths().clipDerived(clip.id);
    const centre = 160 + 120 * 320;
    const rgb = await sharp(layout.frame(0)).raw().toBuffer();
    for (const [channel, pure] of [
      [0, 255],
      [1, 0],
      [2, 0],
    ]) {
      expect(Math.abs(rgb[centre * 3 + channel]! - pure!)).toBeLessThanOrEqual(MAX_CODE_DEVIATION);
    }
    const lumaBytes = await sharp(await viewImage(clip.id, 0, 'luma', createFolderStore(paths().root)))
      .extractChannel(0)
      .raw()
      .toBuffer();
    const l = decodeLuma(new Uint8Array(lumaBytes.buffer, lumaBytes.byteOffset, lumaBytes.length));
    const chromaBytes = await sharp(await viewImage(clip.id, 0, 'chroma', createFolderStore(paths().root)))
      .toColourspace('rgb16')
      .raw({ depth: 'ushort' })
      .toBuffer();
    const chroma = new Uint16Array(chromaBytes.buffer, chromaBytes.byteOffset, chromaBytes.length / 2);
    const a = new Float32Array(l.length);
    const b = new Float32Array(l.length);
    decodeChroma(chroma, a, b);
    expect(Math.abs(l[centre]! - RED_LAB.l)).toBeLessThanOrEqual(LAB_TOLERANCE);
    expect(Math.abs(a[centre]! - RED_LAB.a)).toBeLessThanOrEqual(LAB_TOLERANCE);
    expect(Math.abs(b[centre]! - RED_LAB.b)).toBeLessThanOrEqual(LAB_TOLERANCE);
    expect(chroma[centre * 3 + 2]).toBe(0);
  });
});

describe('sampling by timestamps', () => {
  it('applies rotation and samples a variable-frame-rate clip evenly in time', async () => {
    // Frames 25–59 of 100 are dropped and the rest keep their timestamps (variable frame rate), and the stream
    // says to show it turned a quarter: frames must come out upright (240×320) and evenly spaced in time.
    const vfr = await makePatternClip(path.join(gen, 'vfr.mp4'), CLIP_S, "select='not(between(n,25,59))'", [
      '-vsync',
      'vfr',
    ]);
    const file = await withRotation(vfr, path.join(gen, 'rotated-vfr.mp4'), 90);
    const fps = 5;
    const { clip } = await processNew(file, 'rotated', { sampleFps: fps });
    expect(clip.rotation % 180).toBe(90);
    const rows = await frameRows(clip.id);
    expect(rows).toHaveLength(CLIP_S * fps);
    rows.forEach((row) => expect(row.timeS).toBeCloseTo(row.index / fps, 6));
    expect(await sharp(paths().clipDerived(clip.id).frame(0)).metadata()).toMatchObject({ width: 240, height: 320 });
  });
});

describe('reprocessing', () => {
  it('replaces the derived files and rows after a settings change and keeps the verdict', async () => {
    const { clip, project } = await processNew(await makePatternClip(path.join(gen, 'again.mp4'), CLIP_S), 'again');
    const before = clip.frameCount!;
    await clip.update({ state: 'accepted' });
    await Project.update({ sampleFps: 2.5 }, { where: { id: project.id } });
    await reprocessClip(clip.id, adminId);
    await worker.drain();
    await clip.reload();
    const after = CLIP_S * 2.5;
    expect(before).not.toBe(after);
    expect(clip).toMatchObject({ state: 'accepted', stage: null, error: null, frameCount: after });
    expect(await frameRows(clip.id)).toHaveLength(after);
    const layout = paths().clipDerived(clip.id);
    expect(fs.readdirSync(layout.framesDir)).toHaveLength(after);
    expect(workFolders(server, clip.id)).toEqual([]);
    expect(await Job.count({ where: { clipId: clip.id, state: 'done' } })).toBe(2);
  });
});

describe('a clip deleted while it is processed', () => {
  it('stops quietly and leaves nothing behind', async () => {
    const project = await addProject(adminId, 'deleted');
    const { clip } = await insertClip(
      server,
      await makePatternClip(path.join(gen, 'gone.mp4'), CLIP_S),
      project.id,
      adminId,
    );
    const running = worker.runtime.runOnce();
    while ((await Clip.findByPk(clip.id))?.stage !== 'signals') await new Promise((done) => setTimeout(done, 20));
    // What removing a clip does: its rows go (the job cascades with it), then its folder.
    await clip.destroy();
    fs.rmSync(paths().clipDir(clip.id), { recursive: true, force: true });
    await running;
    expect(await Frame.count({ where: { clipId: clip.id } })).toBe(0);
    expect(fs.existsSync(paths().clipDir(clip.id))).toBe(false);
  });
});
