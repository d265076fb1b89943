import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { claimJob, finishJob, renewLease } from '../../server/core/jobs/claim';
import { announceWorker, beatWorker, listWorkers, retireWorker } from '../../server/core/jobs/worker-presence';
import { Job, WorkerPresence } from '../../server/core/models';
import { startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(() => server.close());

const LEASE_S = 60;
const at = (t0: Date, seconds: number) => new Date(t0.getTime() + seconds * 1000);
const identity = (name: string, host: string) => ({ name, host, pid: 4242, version: '0.1.0', leaseS: LEASE_S });

describe('a worker that stops beating', () => {
  it('goes stale after a lease, and its leased job passes to another worker, not before', async () => {
    const t0 = new Date(Date.now() - 3600_000);
    await announceWorker(identity('far:4242:aaaa', 'far'), t0);
    await announceWorker(identity('near:4243:bbbb', 'near'), t0);
    const job = await Job.create({
      kind: 'process-clip',
      clipId: null,
      payload: { clipId: 0 },
      state: 'queued',
      runAfter: t0,
    });
    const held = await claimJob('far:4242:aaaa', LEASE_S * 1000, t0);
    expect(held?.id).toBe(job.id);
    await beatWorker('far:4242:aaaa', 1, at(t0, LEASE_S / 3));

    // "far" beats no more; "near" keeps beating and looks for work.
    await beatWorker('near:4243:bbbb', 0, at(t0, LEASE_S - 1));
    expect(await claimJob('near:4243:bbbb', LEASE_S * 1000, at(t0, LEASE_S - 1))).toBeNull();
    const before = await listWorkers(at(t0, LEASE_S - 1));
    expect(before.map((worker) => [worker.host, worker.state, worker.jobsRunning])).toEqual([
      ['near', 'active', 0],
      ['far', 'active', 1],
    ]);

    // A whole lease after far's last beat it is stale, and its lease has run out since its claim.
    const later = at(t0, LEASE_S / 3 + LEASE_S + 1);
    await beatWorker('near:4243:bbbb', 0, later);
    const after = await listWorkers(later);
    expect(after.find((worker) => worker.host === 'far')?.state).toBe('stale');
    const taken = await claimJob('near:4243:bbbb', LEASE_S * 1000, later);
    expect(taken?.id).toBe(job.id);
    expect(taken?.leaseOwner).toBe('near:4243:bbbb');
    expect(taken?.attempts).toBe(2);

    // Should far wake up, it can neither keep nor finish the job.
    expect(await renewLease({ jobId: job.id, owner: 'far:4242:aaaa' }, LEASE_S * 1000)).toBe(false);
    expect(await finishJob({ jobId: job.id, owner: 'far:4242:aaaa' })).toBe(false);
    expect(await finishJob({ jobId: job.id, owner: 'near:4243:bbbb' })).toBe(true);
  });

  it('lists a worker that stopped cleanly as stopped, and forgets workers unheard of for a day', async () => {
    const now = new Date();
    await announceWorker(identity('gone:1:cccc', 'gone'), new Date(now.getTime() - 25 * 3600_000));
    await announceWorker(identity('done:2:dddd', 'done'), now);
    await retireWorker('done:2:dddd', now);
    const listed = await listWorkers(now);
    expect(listed.find((worker) => worker.host === 'done')).toMatchObject({ state: 'stopped', jobsRunning: 0 });
    expect(listed.find((worker) => worker.host === 'gone')).toBeUndefined();
    // The next announcement clears the row of the worker unheard of for more than a day.
    await announceWorker(identity('fresh:3:eeee', 'fresh'), now);
    expect(await WorkerPresence.findByPk('gone:1:cccc')).toBeNull();
    expect(await beatWorker('gone:1:cccc', 0, now)).toBe(false);
  });
});
