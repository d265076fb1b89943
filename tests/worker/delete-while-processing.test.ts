import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Frame, Job, MotionField } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { CLIP_STAGES } from '../../shared/pipeline-stages';
import { addProject, insertClip, makePatternClip } from '../helpers/pipeline-clips';
import { closePipelineBed, startPipelineBed, type TestRuntime } from '../helpers/pipeline-runtime';
import { signedInAgent, type TestServer } from '../helpers/test-server';

/**
 * DELETE /api/clips/:id while the worker's runtime (in this process, as in the worker) is inside each stage:
 * the answer is 204 every time, the job ends quietly and no folder, work folder or row of the clip is left.
 * In the sample stage the delete waits until ffmpeg has written frames, so it races with files being created.
 */

const CLIP_S = 4;
const LONG_CLIP_S = 30;
let server: TestServer;
let worker: TestRuntime;
let admin: Awaited<ReturnType<typeof signedInAgent>>;
let adminId: number;
let source: string;
let longSource: string;

beforeAll(async () => {
  let gen: string;
  ({ server, worker, adminId, gen } = await startPipelineBed());
  admin = await signedInAgent(server, 'admin@example.test');
  source = await makePatternClip(path.join(gen, 'row.mp4'), CLIP_S);
  longSource = await makePatternClip(path.join(gen, 'long-row.mp4'), LONG_CLIP_S);
}, 60_000);
afterAll(() => closePipelineBed({ server, worker }));

const clipsDir = () => path.dirname(storagePaths(server.storageDir).clipDir(1));

/** True once ffmpeg has written a few frames into the sample stage's work folder. */
function samplingUnderWay(clipId: number): boolean {
  const dir = storagePaths(server.storageDir).clipDir(clipId);
  const work = fs.existsSync(dir) ? fs.readdirSync(dir).find((name) => name.startsWith('work-sample')) : undefined;
  const frames = work ? path.join(dir, work, 'frames') : '';
  return Boolean(work) && fs.existsSync(frames) && fs.readdirSync(frames).length >= 2;
}

describe('deleting a clip while the worker processes it', () => {
  for (const stage of CLIP_STAGES) {
    it(`answers 204 during ${stage} and leaves nothing behind`, async () => {
      // Sampling every frame keeps ffmpeg creating files for a while: the window a plain recursive delete loses.
      const settings = stage === 'sample' ? { sampleFps: 25 } : {};
      const project = await addProject(adminId, `deleted in ${stage}`, settings);
      const { clip } = await insertClip(server, stage === 'sample' ? longSource : source, project.id, adminId);
      const running = worker.runtime.runOnce();
      await expect
        .poll(
          async () =>
            (await Clip.findByPk(clip.id))?.stage === stage && (stage !== 'sample' || samplingUnderWay(clip.id)),
          { timeout: 60_000, interval: 10 },
        )
        .toBe(true);
      await admin.agent.delete(`/api/clips/${clip.id}`).set('x-csrf-token', admin.csrf).expect(204);
      await running;
      expect(await Job.count({ where: { clipId: clip.id } })).toBe(0);
      expect(await Frame.count({ where: { clipId: clip.id } })).toBe(0);
      expect(await MotionField.count({ where: { clipId: clip.id } })).toBe(0);
      expect(fs.existsSync(storagePaths(server.storageDir).clipDir(clip.id))).toBe(false);
      expect(fs.readdirSync(clipsDir()).filter((name) => name.includes(String(clip.id)))).toEqual([]);
    }, 90_000);
  }
});
