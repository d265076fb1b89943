/**
 * Clip pictures benchmark (not a test): the 30 pictures the review flow asks for one clip (10 stored frames,
 * 10 luma views, 10 motion pictures), each asked three times in a row as a curator, a second curator and a reload
 * would: a first GET, a second GET, and a revalidation (If-None-Match with the ETag of the first).
 * Through supertest on the in-process app, with the picture memory off (0 bytes: every answer makes its picture,
 * as before pictures were kept) and on (the default bound), side by side in one run; per picture, median of
 * the rounds.
 *   npm run bench:clip-pictures [-- --rounds 5]
 */
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { performance } from 'node:perf_hooks';
import { pictureCacheStats, setPictureCacheBytes } from '../server/core/clips/made-pictures';
import { DEFAULT_PICTURE_CACHE_BYTES } from '../server/core/clips/picture-cache';
import { MotionField } from '../server/core/models';
import { addProject, insertClip, makePatternClip } from '../tests/helpers/pipeline-clips';
import { startTestRuntime } from '../tests/helpers/pipeline-runtime';
import { addUser, signedInAgent, startTestServer } from '../tests/helpers/test-server';

const { values } = parseArgs({ options: { rounds: { type: 'string', default: '5' } } });
const ROUNDS = Number(values.rounds);
const EACH_KIND = 10;
const ASKS = ['first GET', 'second GET', 'revalidation'] as const;

const server = await startTestServer();
try {
  await addUser(server, 'curator');
  const adminId = (await addUser(server, 'admin')).id;
  const project = await addProject(adminId, 'bench pictures', { sampleFps: 5, workingSize: 320 });
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const file = await makePatternClip(path.join(gen, 'clip.mp4'), 4);
  const clip = (await insertClip(server, file, project.id, adminId)).clip;
  const runtime = startTestRuntime(server);
  await runtime.drain();
  await runtime.close();
  const fields = await MotionField.forwardOfClip(clip.id);
  if (fields.length < EACH_KIND) throw new Error(`The clip has ${fields.length} forward fields; ${EACH_KIND} needed.`);
  const indexes = fields.slice(0, EACH_KIND).map((field) => field.fromIndex);
  const kinds = {
    'stored frame': indexes.map((k) => `/api/clips/${clip.id}/frames/${k}`),
    'luma view': indexes.map((k) => `/api/clips/${clip.id}/views/${k}/luma`),
    'motion picture': indexes.map((k) => `/api/clips/${clip.id}/motion/${k}`),
  };
  const { agent } = await signedInAgent(server, 'curator@example.test');

  /** ms per picture of each kind and ask, one round: every picture asked three times in a row. */
  async function round(): Promise<Map<string, number>> {
    const times = new Map<string, number>();
    for (const [kind, urls] of Object.entries(kinds)) {
      const spent = ASKS.map(() => 0);
      for (const url of urls) {
        let etag = '';
        for (const [a, ask] of ASKS.entries()) {
          const started = performance.now();
          const response = await (ask === 'revalidation' ? agent.get(url).set('If-None-Match', etag) : agent.get(url));
          spent[a]! += performance.now() - started;
          if (response.status !== 200 && response.status !== 304) throw new Error(`${url}: ${response.status}`);
          etag = response.headers.etag ?? etag;
        }
      }
      for (const [a, ask] of ASKS.entries()) times.set(`${kind}|${ask}`, spent[a]! / urls.length);
    }
    return times;
  }

  async function measure(maxBytes: number): Promise<{ times: Map<string, number>; made: number }> {
    const rounds: Map<string, number>[] = [];
    let made = 0;
    for (let r = 0; r < ROUNDS; r += 1) {
      setPictureCacheBytes(maxBytes);
      rounds.push(await round());
      made += pictureCacheStats().made;
    }
    const median = (key: string) => rounds.map((times) => times.get(key)!).sort((a, b) => a - b)[ROUNDS >> 1]!;
    return { times: new Map([...rounds[0]!.keys()].map((key) => [key, median(key)])), made: made / ROUNDS };
  }

  await measure(0); // warm-up: modules, database pages, sharp's first encode
  const off = await measure(0);
  const on = await measure(DEFAULT_PICTURE_CACHE_BYTES);
  console.log(`Clip ${clip.id}: ${EACH_KIND} pictures of each kind, ${ROUNDS} rounds, median ms per picture`);
  console.log('kind            ask            memory off  memory on  on/off');
  for (const key of off.times.keys()) {
    const [kind, ask] = key.split('|') as [string, string];
    const before = off.times.get(key)!;
    const after = on.times.get(key)!;
    console.log(
      `${kind.padEnd(15)} ${ask.padEnd(14)} ${before.toFixed(2).padStart(10)} ${after.toFixed(2).padStart(10)}` +
        `  ${(after / before).toFixed(2).padStart(6)}`,
    );
  }
  console.log(`Pictures made per round: memory off ${off.made}, memory on ${on.made}`);
} finally {
  setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES);
  await server.close();
}
