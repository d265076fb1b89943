import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { createDemoAccountsOnFirstStart } from '../../server/core/people/demo-accounts';
import { startTestServer, type TestServer } from './test-server';

export interface RunningServer extends TestServer {
  baseUrl: string;
}

/** The app with the built client on a loopback port, with the demo accounts, for browser tests. */
export async function startRunningServer(): Promise<RunningServer> {
  const server = await startTestServer({}, { clientDir: path.resolve('dist') });
  await createDemoAccountsOnFirstStart(server.config.bcryptCost);
  const listener = server.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => listener.once('listening', () => resolve()));
  const { port } = listener.address() as AddressInfo;
  return {
    ...server,
    baseUrl: `http://127.0.0.1:${port}`,
    async close() {
      listener.closeAllConnections();
      await new Promise<void>((resolve) => listener.close(() => resolve()));
      await server.close();
    },
  };
}
