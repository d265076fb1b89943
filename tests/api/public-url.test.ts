import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/core/config';
import { linksGoElsewhere } from '../../shared/public-address';
import { addUser, appWith, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'admin');
  await addUser(server, 'operator');
});
afterAll(async () => {
  await server.close();
});

describe('the public URL', () => {
  it('defaults to this server on its own port, unless KINEFOLD_PUBLIC_URL says otherwise', () => {
    expect(loadConfig({ PORT: '4173' })).toMatchObject({
      publicUrl: 'http://localhost:4173',
      publicUrlSource: 'derived',
    });
    expect(loadConfig({})).toMatchObject({ publicUrl: 'http://localhost:3000', publicUrlSource: 'derived' });
    const configured = loadConfig({ PORT: '4173', KINEFOLD_PUBLIC_URL: 'https://kinefold.example.test' });
    expect(configured).toMatchObject({ publicUrl: 'https://kinefold.example.test', publicUrlSource: 'configured' });
    expect(configured.mailFrom).toBe('Kinefold <kinefold@kinefold.example.test>');
  });

  it('is shown to admins only (GET /api/settings/public-url)', async () => {
    await request(server.app).get('/api/settings/public-url').expect(401);
    const operator = await signedInAgent(server, 'operator@example.test');
    await operator.agent.get('/api/settings/public-url').expect(403);
    const admin = await signedInAgent(server, 'admin@example.test');
    expect((await admin.agent.get('/api/settings/public-url').expect(200)).body).toEqual({
      publicUrl: 'http://localhost:3000',
      source: 'derived',
    });
    await admin.agent.get('/api/settings/public-url?publicUrl=x').expect(400);

    const configured = appWith(server, { publicUrl: 'https://field.example.test', publicUrlSource: 'configured' });
    try {
      const again = await signedInAgent(configured, 'admin@example.test');
      expect((await again.agent.get('/api/settings/public-url').expect(200)).body).toEqual({
        publicUrl: 'https://field.example.test',
        source: 'configured',
      });
    } finally {
      configured.close();
    }
  });

  it('counts a different scheme, host or port as leading elsewhere (URL origins, WHATWG URL Standard)', () => {
    expect(linksGoElsewhere('http://localhost:3000', 'http://localhost:3000')).toBe(false);
    expect(linksGoElsewhere('http://localhost:3000/', 'http://localhost:3000')).toBe(false);
    expect(linksGoElsewhere('http://localhost:80', 'http://localhost')).toBe(false);
    expect(linksGoElsewhere('http://localhost:3000', 'http://localhost:5173')).toBe(true);
    expect(linksGoElsewhere('http://localhost:3000', 'http://127.0.0.1:3000')).toBe(true);
    expect(linksGoElsewhere('https://kinefold.example.test', 'http://kinefold.example.test')).toBe(true);
    expect(linksGoElsewhere('not a url', 'http://localhost:3000')).toBe(true);
  });
});
