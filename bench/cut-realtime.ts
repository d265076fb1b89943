/**
 * What the cut detector's evidence costs the pipeline (not a test). The clip of bench:pipeline (60 s 1280×720,
 * the demo's foliage panning with a crate crossing) is processed in this process by the worker's real process-clip
 * handler over a test server's database and storage, at a new project's defaults, in rounds: once with the
 * detector and once with its evidence switched off (createProcessClip({ cutEvidence: false }): no thumbs, no pair
 * evidence, cuts from the histogram alone, as before the detector), the order alternating from round to round,
 * one frame pool for both. Each round prints both real-time factors (seconds of footage per second of wall time,
 * from claiming the job to its end) and the change; the goal is no fall of more than 5 % in any round.
 *   npm run bench:cut-realtime [-- --seconds 60 --rounds 4]
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { Clip } from '../server/core/models';
import { createObjectStore } from '../server/core/storage/open-store';
import { HANDLERS } from '../worker/jobs/handlers';
import { createProcessClip } from '../worker/jobs/process-clip';
import { createFramePool } from '../worker/pool/frame-pool';
import { createJobRuntime, type JobRuntime } from '../worker/runtime/job-runtime';
import { workerStorage } from '../worker/storage/worker-storage';
import { addProject, insertClip } from '../tests/helpers/pipeline-clips';
import { addUser, startTestServer } from '../tests/helpers/test-server';
import { renderRowPassClip } from './row-pass-clip';

const { values } = parseArgs({
  options: { seconds: { type: 'string', default: '60' }, rounds: { type: 'string', default: '4' } },
});
const SECONDS = Math.max(5, Number(values.seconds));
const ROUNDS = Math.max(1, Number(values.rounds));
const GOAL_FALL = 0.05;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-cut-realtime-'));

const file = await renderRowPassClip(work, SECONDS);
const server = await startTestServer();
const pool = createFramePool();
try {
  const adminId = (await addUser(server, 'admin')).id;
  const storage = workerStorage(server.config, createObjectStore(server.config));
  const runtime = (cutEvidence: boolean): JobRuntime =>
    createJobRuntime({
      config: server.config,
      storage,
      pool,
      owner: cutEvidence ? 'with-evidence' : 'without-evidence',
      handlers: { ...HANDLERS, 'process-clip': createProcessClip({ cutEvidence }) },
    });
  const runtimes = { with: runtime(true), without: runtime(false) };

  let runs = 0;
  /** Processes one fresh upload of the clip; its real-time factor. */
  async function processOnce(which: keyof typeof runtimes): Promise<number> {
    // Jobs other than this clip's (none are expected) run first, untimed.
    while (await runtimes[which].runOnce());
    // A project of its own each time: a project holds one clip of given bytes.
    const project = await addProject(adminId, `Cut cost ${(runs += 1)}`);
    const { clip } = await insertClip(server, file, project.id, adminId);
    const start = performance.now();
    if (!(await runtimes[which].runOnce())) throw new Error('the clip’s job was not claimed');
    const wallS = (performance.now() - start) / 1000;
    const done = await Clip.findByPk(clip.id);
    if (done?.state !== 'awaiting_review') throw new Error(`the clip ended ${done?.state}: ${done?.error}`);
    return SECONDS / wallS;
  }

  // A first pass of each warms the threads and the code up; it is not counted.
  await processOnce('with');
  await processOnce('without');
  const falls: number[] = [];
  for (let round = 0; round < ROUNDS; round += 1) {
    const load = os.loadavg()[0]!.toFixed(2);
    const order: (keyof typeof runtimes)[] = round % 2 === 0 ? ['without', 'with'] : ['with', 'without'];
    const factor: Record<string, number> = {};
    for (const which of order) factor[which] = await processOnce(which);
    const fall = 1 - factor.with! / factor.without!;
    falls.push(fall);
    console.log(
      `round ${round + 1} (${order.join(' first, ')} second; load ${load}): real-time factor without the evidence ` +
        `${factor.without!.toFixed(3)}, with it ${factor.with!.toFixed(3)}, ratio ${(factor.with! / factor.without!).toFixed(3)} ` +
        `(${fall >= 0 ? 'fall' : 'rise'} of ${(Math.abs(fall) * 100).toFixed(1)} %)`,
    );
  }
  const worst = Math.max(...falls);
  const mean = falls.reduce((sum, fall) => sum + fall, 0) / falls.length;
  console.log(
    `${ROUNDS} rounds: mean fall ${(mean * 100).toFixed(1)} %, largest ${(worst * 100).toFixed(1)} %; goal (no fall ` +
      `over ${GOAL_FALL * 100} % in any round) ${worst <= GOAL_FALL ? 'met' : 'NOT met'}; load now ${os.loadavg()[0]!.toFixed(2)}`,
  );
} finally {
  await pool.destroy();
  await server.close();
  fs.rmSync(work, { recursive: true, force: true });
}
