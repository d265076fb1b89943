import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { announceWorker, beatWorker } from '../../server/core/jobs/worker-presence';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'admin');
  await addUser(server, 'curator');
});
afterAll(() => server.close());

describe('GET /api/jobs/workers', () => {
  it('is 401 signed out, 403 for other roles and 400 with a query', async () => {
    await request(server.app).get('/api/jobs/workers').expect(401);
    const { agent: curator } = await signedInAgent(server, 'curator@example.test');
    await curator.get('/api/jobs/workers').expect(403);
    const { agent: admin } = await signedInAgent(server, 'admin@example.test');
    const { body } = await admin.get('/api/jobs/workers?host=x').expect(400);
    expect(body.error.message).toMatch(/host/);
  });

  it('lists each announced worker with host, pid, version, running jobs, last beat and state', async () => {
    const now = Date.now();
    const worker = { pid: 77, version: '0.1.0', leaseS: 30 };
    await announceWorker({ ...worker, name: 'rack-1:77:aaaa', host: 'rack-1' }, new Date(now - 5_000));
    await beatWorker('rack-1:77:aaaa', 2, new Date(now - 1_000));
    // Last heard of 31 s ago with a 30 s lease: stale.
    await announceWorker({ ...worker, name: 'rack-2:77:bbbb', host: 'rack-2' }, new Date(now - 31_000));
    const { agent } = await signedInAgent(server, 'admin@example.test');
    const { body } = await agent.get('/api/jobs/workers').expect(200);
    expect(body).toEqual([
      {
        name: 'rack-1:77:aaaa',
        host: 'rack-1',
        pid: 77,
        version: '0.1.0',
        leaseS: 30,
        jobsRunning: 2,
        startedAt: new Date(now - 5_000).toISOString(),
        lastBeatAt: new Date(now - 1_000).toISOString(),
        state: 'active',
      },
      expect.objectContaining({ host: 'rack-2', jobsRunning: 0, state: 'stale' }),
    ]);
  });
});
