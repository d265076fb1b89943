/**
 * Pipeline benchmark (not a test): a generated 60 s 1280×720 clip (25 frames/s, the foliage texture of the demo
 * seen through a panning window with an object crossing) is uploaded to a real server and processed by a real
 * worker process at a new project's defaults. Prints the real-time factor (seconds of footage per second of wall
 * time, goal ≥ 1.0), the time each stage took, and the API's response times while the worker runs beside the same
 * requests on the idle server measured first (goal: every answer within 200 ms).
 *   npm run bench:pipeline [-- --seconds 60]
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import type { ClipDetail } from '../shared/types/clips';
import { renderRowPassClip, ROW_PASS_HEIGHT, ROW_PASS_WIDTH } from './row-pass-clip';
import { startRunningApp, type RunningApp, type Session } from '../tests/helpers/app-processes';

const { values } = parseArgs({ options: { seconds: { type: 'string', default: '60' } } });
const SECONDS = Math.max(5, Number(values.seconds));
const POLL_MS = 250;
const IDLE_ROUNDS = 40;
const RESPONSE_GOAL_MS = 200;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-pipeline-'));

interface Latencies {
  ms: number[];
}

/** GETs `url`, timing it to the last byte of the answer; resolves with the answer's body. */
async function timed(app: RunningApp, session: Session, url: string, into: Latencies): Promise<string> {
  const start = performance.now();
  const response = await app.api(session, 'GET', url);
  const body = await response.text();
  into.ms.push(performance.now() - start);
  if (!response.ok) throw new Error(`GET ${url} was answered ${response.status}`);
  return body;
}

function percentile(values: number[], share: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor(share * sorted.length))] ?? Number.NaN;
}

function describe(name: string, latencies: Latencies): string {
  const { ms } = latencies;
  return (
    `${name}: ${ms.length} requests, p50 ${percentile(ms, 0.5).toFixed(1)} ms, ` +
    `p95 ${percentile(ms, 0.95).toFixed(1)} ms, max ${Math.max(...ms).toFixed(1)} ms`
  );
}

/** The requests a person's screens make while a clip processes: who am I, the library page, the clip itself. */
const SCREEN_REQUESTS = ['/api/me', '/api/clips?page=1&pageSize=25'];

const renderStart = performance.now();
const file = await renderRowPassClip(work, SECONDS);
console.log(
  `clip: ${SECONDS} s ${ROW_PASS_WIDTH}×${ROW_PASS_HEIGHT} at 25 frames/s, ${(fs.statSync(file).size / 1024 ** 2).toFixed(1)} MiB, ` +
    `rendered in ${((performance.now() - renderStart) / 1000).toFixed(1)} s`,
);

const app = await startRunningApp(path.join(work, 'storage'), { worker: true });
try {
  const session = await app.signIn('admin');
  const created = await app.api(session, 'POST', '/api/projects', { name: 'Pipeline benchmark' });
  const project = (await created.json()) as { id: number; settings: Record<string, unknown> };
  console.log(`project defaults: ${JSON.stringify(project.settings)}`);

  const idle: Latencies = { ms: [] };
  for (let round = 0; round < IDLE_ROUNDS; round += 1) {
    for (const url of SCREEN_REQUESTS) await timed(app, session, url, idle);
  }

  const uploaded = await app.upload(session, file, project.id);
  if (uploaded.status !== 201) throw new Error(`the upload was answered ${uploaded.status}: ${uploaded.body}`);
  const clipId = (JSON.parse(uploaded.body) as { id: number }).id;
  const start = performance.now();
  const busy: Latencies = { ms: [] };
  const stageStarts = new Map<string, number>();
  let clip: ClipDetail;
  for (;;) {
    for (const url of SCREEN_REQUESTS) await timed(app, session, url, busy);
    clip = JSON.parse(await timed(app, session, `/api/clips/${clipId}`, busy)) as ClipDetail;
    if (clip.stage && !stageStarts.has(clip.stage)) stageStarts.set(clip.stage, performance.now());
    if (clip.state !== 'queued' && clip.state !== 'processing') break;
    await new Promise((done) => setTimeout(done, POLL_MS));
  }
  const wallS = (performance.now() - start) / 1000;
  if (clip.state !== 'awaiting_review') throw new Error(`the clip ended ${clip.state}: ${JSON.stringify(clip)}`);

  const stages = [...stageStarts.entries()];
  console.log(
    `processed ${clip.frameCount} frames in ${wallS.toFixed(1)} s of wall time; flags: ` +
      `${clip.flags.join(', ') || 'none'}`,
  );
  console.log(
    `stages (from the first poll that saw each): ${stages
      .map(([stage, at], index) => {
        const end = stages[index + 1]?.[1] ?? start + wallS * 1000;
        return `${stage} ${((end - at) / 1000).toFixed(1)} s`;
      })
      .join(', ')}`,
  );
  console.log(
    `real-time factor: ${(SECONDS / wallS).toFixed(2)} (seconds of footage per second of wall time; ` + 'goal ≥ 1.0)',
  );
  console.log(describe('API on the idle server', idle));
  console.log(describe('API while the worker processes', busy));
  const slow = busy.ms.filter((ms) => ms > RESPONSE_GOAL_MS).length;
  console.log(
    `p95 while processing ÷ idle p95: ${(percentile(busy.ms, 0.95) / percentile(idle.ms, 0.95)).toFixed(2)}×; ` +
      `answers over ${RESPONSE_GOAL_MS} ms: ${slow} of ${busy.ms.length}`,
  );
} finally {
  await app.stop();
  fs.rmSync(work, { recursive: true, force: true });
}
