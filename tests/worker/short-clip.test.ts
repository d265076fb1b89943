import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Frame } from '../../server/core/models';
import { addProject, insertClip, makePatternClip } from '../helpers/pipeline-clips';
import { closePipelineBed, startPipelineBed, type TestRuntime } from '../helpers/pipeline-runtime';
import type { TestServer } from '../helpers/test-server';

/**
 * Footage shorter than one sampling step: at 25 frames/s, `duration=0.04` of the test pattern is exactly one
 * frame, and `duration=0.08` two, against a project sampling 5 frames/s (one step = 0.2 s). Before, ffmpeg's fps
 * filter rounded such a clip to no frame at all and processing blamed a damaged file.
 */

let server: TestServer;
let worker: TestRuntime;
let adminId: number;
let gen: string;

beforeAll(async () => {
  ({ server, worker, adminId, gen } = await startPipelineBed());
});
afterAll(() => closePipelineBed({ server, worker }));

describe('a clip shorter than one sampling step', () => {
  for (const [frames, seconds] of [
    [1, 0.04],
    [2, 0.08],
  ] as const) {
    it(`of ${frames} frame(s) is processed with its first frame sampled`, async () => {
      const project = await addProject(adminId, `blink ${frames}`, { sampleFps: 5 });
      const file = await makePatternClip(path.join(gen, `blink-${frames}.mp4`), seconds);
      const { clip } = await insertClip(server, file, project.id, adminId);
      await worker.drain();
      await clip.reload();
      expect([clip.state, clip.error]).toEqual(['awaiting_review', null]);
      expect(clip.frameCount).toBe(1);
      const rows = await Frame.findAll({ where: { clipId: clip.id } });
      expect(rows.map((row) => [row.index, row.timeS])).toEqual([[0, 0]]);
      expect((await Clip.findByPk(clip.id))!.hasThumbnail).toBe(true);
    }, 60_000);
  }
});
