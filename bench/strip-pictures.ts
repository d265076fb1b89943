/**
 * Strip pictures benchmark (not a test): the frame strip of the review screen shows 14 frames and their 14 motion
 * pictures 34 pixels high. Side by side in one run, per picture: as the strip asked before (the stored frame and
 * the motion picture whole, 320 × 180) and as it asks now (`?height=34`, WebP), the bytes sent and the time of a
 * first GET with the picture memory on. The small ones are asked after the whole ones: a small motion picture's
 * time is then the shrinking of the kept whole one; a small frame's, reading the stored frame and shrinking it.
 * A clip from the pipeline (workingSize 320, 5 frames a second), through supertest on the in-process app.
 *   npm run bench:strip-pictures
 */
import fs from 'node:fs';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { setPictureCacheBytes } from '../server/core/clips/made-pictures';
import { DEFAULT_PICTURE_CACHE_BYTES } from '../server/core/clips/picture-cache';
import { MotionField } from '../server/core/models';
import { addProject, insertClip, makePatternClip } from '../tests/helpers/pipeline-clips';
import { startTestRuntime } from '../tests/helpers/pipeline-runtime';
import { addUser, signedInAgent, startTestServer } from '../tests/helpers/test-server';

/** What a 1440-pixel-wide review screen shows of the strip before scrolling (clip-evidence.ts, STRIP_AHEAD). */
const STRIP_FRAMES = 14;
const STRIP_HEIGHT = 34;

const server = await startTestServer();
try {
  await addUser(server, 'curator');
  const adminId = (await addUser(server, 'admin')).id;
  const project = await addProject(adminId, 'bench strip', { sampleFps: 5, workingSize: 320 });
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const clip = (await insertClip(server, await makePatternClip(path.join(gen, 'clip.mp4'), 4), project.id, adminId))
    .clip;
  const runtime = startTestRuntime(server);
  await runtime.drain();
  await runtime.close();
  const fields = await MotionField.forwardOfClip(clip.id);
  if (fields.length < STRIP_FRAMES) throw new Error(`The clip has ${fields.length} forward fields; 14 needed.`);
  const indexes = fields.slice(0, STRIP_FRAMES).map((field) => field.fromIndex);
  const { agent } = await signedInAgent(server, 'curator@example.test');
  setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES);

  /** Bytes and ms of a first GET of each picture, summed over the strip. */
  async function strip(kind: 'frames' | 'motion', query: string): Promise<{ bytes: number; ms: number }> {
    let bytes = 0;
    let ms = 0;
    for (const index of indexes) {
      const started = performance.now();
      const response = await agent.get(`/api/clips/${clip.id}/${kind}/${index}${query}`).buffer(true);
      ms += performance.now() - started;
      if (response.status !== 200) throw new Error(`${kind}/${index}${query}: ${response.status}`);
      bytes += Number(response.headers['content-length']);
    }
    return { bytes, ms };
  }

  await strip('frames', ''); // warm-up: modules, database pages, sharp's first encode
  setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES);
  console.log(`Clip ${clip.id}: the strip's ${STRIP_FRAMES} frames and ${STRIP_FRAMES} motion pictures, first GETs`);
  console.log('picture          whole: KB     ms   small: KB     ms   bytes small/whole');
  for (const kind of ['frames', 'motion'] as const) {
    const whole = await strip(kind, '');
    const small = await strip(kind, `?height=${STRIP_HEIGHT}`);
    console.log(
      `${kind.padEnd(15)} ${(whole.bytes / 1024).toFixed(1).padStart(10)} ${whole.ms.toFixed(0).padStart(6)}` +
        ` ${(small.bytes / 1024).toFixed(1).padStart(10)} ${small.ms.toFixed(0).padStart(6)}` +
        `   ${(small.bytes / whole.bytes).toFixed(3).padStart(8)}`,
    );
  }
} finally {
  setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES);
  await server.close();
}
