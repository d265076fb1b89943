import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Sequelize } from 'sequelize';
import request from 'supertest';
import { createApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/core/config';
import { openKinefoldDatabase } from '../../server/core/db/open';
import type { Role } from '../../shared/roles';
import { createUser } from '../../server/core/people/users';
import { freshTestDatabase } from './test-database';

export interface TestServer {
  app: ReturnType<typeof createApp>['app'];
  config: Config;
  sequelize: Sequelize;
  storageDir: string;
  /** The environment a child process (a worker, the server) needs to share this storage folder and database. */
  env: { KINEFOLD_STORAGE_DIR: string; KINEFOLD_DATABASE_URL: string };
  /** Stops the app's timers and closes its database, leaving the storage folder and database to other processes. */
  release(): Promise<void>;
  close(): Promise<void>;
}

/**
 * A fresh storage folder and database per test file, and the same app `npm start` serves. The database is SQLite in
 * the storage folder, or a PostgreSQL database of its own in the matrix's `pg` project (test-database.ts).
 */
export async function startTestServer(
  overrides: Partial<Config> = {},
  { clientDir, env = {} }: { clientDir?: string; env?: NodeJS.ProcessEnv } = {},
): Promise<TestServer> {
  const storageDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-test-'));
  const database = await freshTestDatabase();
  const config: Config = {
    ...loadConfig({ ...env, KINEFOLD_STORAGE_DIR: storageDir, KINEFOLD_DEMO: 'off' }),
    bcryptCost: 10,
    signInLimitPerIp: 1000,
    signInLimitPerAccount: 1000,
    databaseUrl: database.url,
    ...overrides,
  };
  const sequelize = await openKinefoldDatabase(config);
  const kinefold = createApp({ config, sequelize, clientDir });
  let released: Promise<void> | null = null;
  const release = () => {
    released ??= (async () => {
      kinefold.close();
      await sequelize.close();
    })();
    return released;
  };
  return {
    app: kinefold.app,
    config,
    sequelize,
    storageDir,
    env: { KINEFOLD_STORAGE_DIR: storageDir, KINEFOLD_DATABASE_URL: database.url ?? '' },
    release,
    async close() {
      await release();
      await database.drop();
      fs.rmSync(storageDir, { recursive: true, force: true });
    },
  };
}

/**
 * Another app over the same database with some settings changed. Models are bound to one database per process,
 * so a test file keeps one database and varies only the app around it.
 */
export function appWith(server: TestServer, overrides: Partial<Config>): { app: TestServer['app']; close(): void } {
  return createApp({ config: { ...server.config, ...overrides }, sequelize: server.sequelize });
}

export const TEST_PASSWORD = 'long-enough-test-phrase';

export async function addUser(server: TestServer, role: Role, email = `${role}@example.test`) {
  return createUser({ email, name: `Test ${role}`, role, password: TEST_PASSWORD }, server.config.bcryptCost, null);
}

/** A cookie-keeping client with the CSRF token every write needs. */
export async function agentWithCsrf(server: Pick<TestServer, 'app'>) {
  const agent = request.agent(server.app);
  const { body } = await agent.get('/api/auth/csrf').expect(200);
  return { agent, csrf: body.token as string };
}

/** A signed-in client for `email`; its CSRF token is fetched again after sign-in (the session id changed). */
export async function signedInAgent(server: Pick<TestServer, 'app'>, email: string, password = TEST_PASSWORD) {
  const { agent, csrf } = await agentWithCsrf(server);
  await agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send({ email, password }).expect(200);
  const { body } = await agent.get('/api/auth/csrf').expect(200);
  return { agent, csrf: body.token as string };
}
