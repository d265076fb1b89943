import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../server/core/models';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
const clientDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-client-'));

beforeAll(async () => {
  fs.mkdirSync(path.join(clientDir, 'assets'));
  fs.writeFileSync(path.join(clientDir, 'index.html'), '<!doctype html><title>Kinefold</title>');
  fs.writeFileSync(path.join(clientDir, 'assets', 'index-Ab12Cd34.js'), 'export {};');
  fs.writeFileSync(path.join(clientDir, 'favicon.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>');
  server = await startTestServer({}, { clientDir });
});
afterAll(async () => {
  await server?.close();
  fs.rmSync(clientDir, { recursive: true, force: true });
});

describe('the built client', () => {
  it('serves files named by their content as immutable for a year, other files for an hour', async () => {
    await addUser(server, 'curator');
    const { agent } = await signedInAgent(server, 'curator@example.test');
    const asset = await agent.get('/assets/index-Ab12Cd34.js').expect(200);
    // RFC 8246 (immutable) and RFC 9111 §5.2.2.1 (max-age, seconds): 365 days.
    expect(asset.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    const icon = await agent.get('/favicon.svg').expect(200);
    expect(icon.headers['cache-control']).toBe('public, max-age=3600');
  });

  it('answers client files without the session: no cookie set, no session row touched', async () => {
    await addUser(server, 'engineer');
    const { agent } = await signedInAgent(server, 'engineer@example.test');
    const before = await Session.findAll({ raw: true, order: [['sid', 'ASC']] });
    const asset = await agent.get('/assets/index-Ab12Cd34.js').expect(200);
    expect(asset.headers['set-cookie']).toBeUndefined();
    expect(await Session.findAll({ raw: true, order: [['sid', 'ASC']] })).toEqual(before);
    // The page itself still goes through the session (rolling: its cookie is renewed).
    const page = await agent.get('/review').expect(200);
    expect(page.headers['cache-control']).toBe('no-cache');
    expect(page.headers['set-cookie']).toBeDefined();
  });

  it('sends index.html for client paths, so the router takes over', async () => {
    const page = await request(server.app).get('/review/12?sort=createdAt').expect(200);
    expect(page.text).toContain('<title>Kinefold</title>');
  });
});
