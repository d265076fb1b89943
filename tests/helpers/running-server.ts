import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { createDemoAccountsOnFirstStart } from '../../server/core/people/demo-accounts';
import { startTestServer, type TestServer } from './test-server';

export interface RunningServer extends TestServer {
  baseUrl: string;
  /** Breaks every open connection, as a lost network would; the server goes on listening. */
  cutConnections(): void;
}

/**
 * The app with the built client on a loopback port, with the demo accounts, for browser tests. The port is taken
 * before the app is built and handed over as PORT, as `npm start` does, so the derived public URL is this server.
 */
export async function startRunningServer(): Promise<RunningServer> {
  const listener = http.createServer();
  listener.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => listener.once('listening', () => resolve()));
  const { port } = listener.address() as AddressInfo;
  const server = await startTestServer({}, { clientDir: path.resolve('dist'), env: { PORT: String(port) } });
  await createDemoAccountsOnFirstStart(server.config.bcryptCost);
  listener.on('request', server.app);
  return {
    ...server,
    baseUrl: `http://127.0.0.1:${port}`,
    cutConnections: () => listener.closeAllConnections(),
    async close() {
      listener.closeAllConnections();
      await new Promise<void>((resolve) => listener.close(() => resolve()));
      await server.close();
    },
  };
}
