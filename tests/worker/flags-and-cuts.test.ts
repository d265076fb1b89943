import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Frame } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { DEFAULT_FLAG_THRESHOLDS, type FlagName } from '../../shared/flag-thresholds';
import type { ClipFlagDetail } from '../../shared/types/clips';
import { DEFAULT_CUT_THRESHOLD } from '../../worker/signals/cuts';
import {
  addProject,
  insertClip,
  makeClip,
  makePatternClip,
  reencode,
  TEST_PATTERN,
  workFolders,
} from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { insertReviewClip } from '../helpers/review-clips';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';

/**
 * Flags and cuts on generated clips, each through the real process-clip handler with the project defaults
 * (sample rate 5 frames/s, working size 320 px). Each made-bad clip sits in a project of its own, so that
 * variants of one test picture are not also flagged as duplicates of each other.
 */

const FPS = 5;
/** The scene switches here: 52 frames of the test pattern at 25 frames/s, then a different picture. */
const SWITCH_S = 2.08;

let server: TestServer;
let worker: TestRuntime;
const clips: Record<string, Clip> = {};

beforeAll(async () => {
  server = await startTestServer();
  worker = startTestRuntime(server);
  const adminId = (await addUser(server, 'admin')).id;
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const file = (name: string) => path.join(gen, `${name}.mp4`);
  const clean = await makePatternClip(file('clean'), 4);
  const made: [name: string, project: string, file: string][] = [
    ['clean', 'field', clean],
    // The same footage encoded again at a much lower quality: other bytes, the same pictures.
    ['re-encoded', 'field', await reencode(clean, file('re-encoded'), 35)],
    ['dark', 'dark', await makePatternClip(file('dark'), 4, 'lutrgb=r=val*0.12:g=val*0.12:b=val*0.12')],
    // Grey, then 2.5 times brighter with every channel capped at 255: the bright half of the picture blows out.
    [
      'overexposed',
      'overexposed',
      await makePatternClip(
        file('overexposed'),
        4,
        String.raw`hue=s=0,lutrgb=r=min(val*2.5\,255):g=min(val*2.5\,255):b=min(val*2.5\,255)`,
      ),
    ],
    ['blurred', 'blurred', await makePatternClip(file('blurred'), 4, 'boxblur=6:2')],
    ['short', 'short', await makePatternClip(file('short'), 1)],
    [
      'scene-switch',
      'scene-switch',
      await makeClip(
        file('scene-switch'),
        [`${TEST_PATTERN}:duration=${SWITCH_S}`, 'mandelbrot=size=320x240:rate=25'],
        ['-filter_complex', '[1:v]trim=duration=2,setpts=PTS-STARTPTS[m];[0:v][m]concat=n=2:v=1[v]', '-map', '[v]'],
      ),
    ],
  ];
  const projects = new Map<string, number>();
  for (const [name, projectName, source] of made) {
    if (!projects.has(projectName)) projects.set(projectName, (await addProject(adminId, projectName)).id);
    clips[name] = (await insertClip(server, source, projects.get(projectName)!, adminId)).clip;
  }
  // Jobs are claimed oldest first, so the clean clip is processed before its re-encoded copy.
  await worker.drain();
  for (const clip of Object.values(clips)) await clip.reload();
});
afterAll(async () => {
  await worker.close();
  await server.close();
});

function detail(name: string, flag: FlagName): ClipFlagDetail | undefined {
  return clips[name]!.flagDetails.find((raised) => raised.flag === flag);
}

describe('every processed clip', () => {
  it('awaits review with exactly one row per frame, one file per frame, and no work folder', async () => {
    for (const clip of Object.values(clips)) {
      expect(clip.state).toBe('awaiting_review');
      const indexes = (await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] })).map(
        (frame) => frame.index,
      );
      expect(indexes).toEqual([...Array(clip.frameCount).keys()]);
      expect(fs.readdirSync(storagePaths(server.storageDir).clipDerived(clip.id).framesDir)).toHaveLength(
        clip.frameCount!,
      );
      expect(workFolders(server, clip.id)).toEqual([]);
    }
  });
});

// Thresholds are the defaults of shared/flag-thresholds.ts. Those for dark, overexposed, short and the duplicate
// share are Kinefold's own choices (common practice, no published source): these checks only show that a clip made
// clearly bad crosses them and a clean one does not.
describe('flags', () => {
  it('raises none on the clean clip', () => {
    expect(clips.clean!.flags).toEqual([]);
    expect(clips.clean!.flagDetails).toEqual([]);
  });

  it('raises dark below the mean-luma threshold, with the value and threshold that raised it', async () => {
    const raised = detail('dark', 'dark');
    expect(raised).toMatchObject({ threshold: DEFAULT_FLAG_THRESHOLDS.darkMeanLuma });
    expect(raised!.value).toBeLessThan(DEFAULT_FLAG_THRESHOLDS.darkMeanLuma);
    const lumas = (await Frame.findAll({ where: { clipId: clips.dark!.id } }))
      .map((f) => f.meanLuma!)
      .sort((x, y) => x - y);
    const middle = lumas.length >> 1;
    const median = lumas.length % 2 ? lumas[middle]! : (lumas[middle - 1]! + lumas[middle]!) / 2;
    expect(raised!.value).toBeCloseTo(median, 6);
    expect(raised!.message).toMatch(/dark/);
  });

  it('raises overexposed on the blown-out clip, from its share of blown highlights', () => {
    const raised = detail('overexposed', 'overexposed');
    expect(raised).toMatchObject({ threshold: DEFAULT_FLAG_THRESHOLDS.overexposedClippedShare });
    expect(raised!.value).toBeGreaterThan(DEFAULT_FLAG_THRESHOLDS.overexposedClippedShare);
    expect(clips.overexposed!.flags).not.toContain('blurry');
  });

  // Variance of the Laplacian (Pech-Pacheco et al., ICPR 2000); "100 or less is regarded as blurry" for 8-bit grey
  // (CHECK-VALUES §9), the default threshold.
  it('raises blurry on the blurred clip, and not on the clean one', () => {
    const raised = detail('blurred', 'blurry');
    expect(raised).toMatchObject({ threshold: DEFAULT_FLAG_THRESHOLDS.blurryLaplacianVariance });
    expect(raised!.value).toBeLessThan(DEFAULT_FLAG_THRESHOLDS.blurryLaplacianVariance);
    expect(clips.clean!.medianSharpness!).toBeGreaterThan(DEFAULT_FLAG_THRESHOLDS.blurryLaplacianVariance);
    expect(clips.blurred!.flags).not.toContain('dark');
  });

  it('raises short on the one-second clip', () => {
    expect(detail('short', 'short')).toMatchObject({
      value: clips.short!.durationS,
      threshold: DEFAULT_FLAG_THRESHOLDS.shortDurationS,
    });
  });

  // dHash (Krawetz, "Kind of Like That", 2013) with near = within 5 of 64 bits, common practice after his posts.
  it('raises duplicate on the re-encoded copy, naming the clip it copies', () => {
    const raised = detail('re-encoded', 'duplicate');
    expect(raised).toMatchObject({ matchClipId: clips.clean!.id, threshold: DEFAULT_FLAG_THRESHOLDS.duplicateShare });
    expect(raised!.value).toBeGreaterThan(DEFAULT_FLAG_THRESHOLDS.duplicateShare);
  });

  it('compares against the other clips a batch of clips at a time, in id order, leaving the clip itself out', async () => {
    const { projectId, uploaderId } = clips.clean!;
    for (const name of ['row-copy-a.mp4', 'row-copy-b.mp4']) {
      const extra = await insertReviewClip({ projectId, uploaderId, originalName: name });
      await Frame.bulkCreate(
        [0, 1].map((index) => ({
          clipId: extra.id,
          index,
          timeS: index / 5,
          dhash: `00000000000000${extra.id}${index}`.slice(-16),
        })),
      );
    }
    const others = (await Clip.findAll({ where: { projectId }, order: [['id', 'ASC']] })).filter(
      (clip) => clip.id !== clips.clean!.id,
    );
    expect(others).toHaveLength(3);
    const batches = [];
    for await (const batch of Frame.hashBatchesOfOtherClips(projectId, clips.clean!.id, 2)) batches.push(batch);
    expect(batches.map((batch) => batch.map((entry) => entry.clipId))).toEqual([
      [others[0]!.id, others[1]!.id],
      [others[2]!.id],
    ]);
    for (const entry of batches.flat()) {
      const stored = await Frame.findAll({ where: { clipId: entry.clipId }, order: [['index', 'ASC']] });
      expect(entry.hashes).toEqual(stored.map((frame) => frame.dhash));
    }
  });
});

describe('cuts', () => {
  // Cut statistic: 1 − correlation of grey histograms of neighbouring frames, as PySceneDetect's
  // HistogramDetector, with its default threshold 0.20 (CHECK-VALUES §9).
  it('marks one cut, before the first sampled frame of the new scene', async () => {
    const frames = await Frame.findAll({ where: { clipId: clips['scene-switch']!.id }, order: [['index', 'ASC']] });
    // ffmpeg's fps filter fills output frame n with the last input frame whose time rounds to n / fps, so the
    // first output frame showing the new scene is round(SWITCH_S × fps).
    const expected = Math.round(SWITCH_S * FPS);
    expect(frames.filter((frame) => frame.cutBefore).map((frame) => frame.index)).toEqual([expected]);
    expect(frames[expected]!.cutScore!).toBeGreaterThanOrEqual(DEFAULT_CUT_THRESHOLD);
    expect(clips['scene-switch']!.cutCount).toBe(1);
  });

  it('marks none in footage without a switch', async () => {
    const frames = await Frame.findAll({ where: { clipId: clips.clean!.id } });
    expect(frames.every((frame) => !frame.cutBefore && (frame.cutScore ?? 0) < DEFAULT_CUT_THRESHOLD)).toBe(true);
  });
});
