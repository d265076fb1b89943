/**
 * A real Kinefold server (and, when asked, a real worker) as child processes on a storage folder, as `npm start`
 * runs them, with signed-in sessions: for the benchmarks and tests that see the product from the outside.
 */
import { execFile, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import net from 'node:net';
import path from 'node:path';
import { promisify } from 'node:util';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import type { Role } from '../../shared/roles';

export interface Session {
  cookie: string;
  csrf: string;
}

export interface RunningApp {
  baseUrl: string;
  server: ChildProcess;
  /** Signs a demo account in. */
  signIn(role: Role): Promise<Session>;
  /** JSON request with the session's cookie and CSRF token. */
  api(session: Session, method: string, url: string, body?: unknown): Promise<Response>;
  /** Streams `file` as a multipart upload to POST /api/clips; resolves with the status and the answer's body. */
  upload(session: Session, file: string, projectId: number): Promise<{ status: number; body: string }>;
  stop(): Promise<void>;
}

const HEALTH_TRIES = 150;
const HEALTH_PAUSE_MS = 200;

/** A later Set-Cookie replaces an earlier one of the same name (the CSRF cookie changes after sign-in). */
function cookieOf(response: Response, old = ''): string {
  const jar = new Map(
    old
      .split('; ')
      .filter(Boolean)
      .map((pair) => [pair.split('=')[0]!, pair]),
  );
  for (const cookie of response.headers.getSetCookie()) jar.set(cookie.split('=')[0]!, cookie.split(';')[0]!);
  return [...jar.values()].join('; ');
}

async function tokenOf(response: Response): Promise<string> {
  return String(((await response.json()) as { token: string }).token);
}

function stopped(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((done) => {
    child.once('exit', () => done());
    child.kill('SIGTERM');
  });
}

export interface AppOptions {
  /** Start a worker process beside the server. */
  worker?: boolean;
  /** KINEFOLD_DEMO; `accounts` (the default here) gives the demo accounts without the demo campaign. */
  demo?: 'full' | 'accounts';
  /** KINEFOLD_DATABASE_URL for both processes (null: SQLite under the storage folder); absent: as in this process. */
  databaseUrl?: string | null;
  /** Where the server's console goes (ignored unless given). */
  onServerOutput?: (line: string) => void;
}

/**
 * A port nothing listens on, chosen by the system (a random one could be taken, or be one of the ports the fetch
 * standard blocks, such as 3659, which Node's fetch refuses as "bad port").
 */
function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = net.createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as net.AddressInfo;
      probe.close(() => resolve(port));
    });
  });
}

export async function startRunningApp(storageDir: string, options: AppOptions = {}): Promise<RunningApp> {
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const env = {
    ...process.env,
    PORT: String(port),
    KINEFOLD_STORAGE_DIR: storageDir,
    KINEFOLD_DEMO: options.demo ?? 'accounts',
    ...(options.databaseUrl === undefined ? {} : { KINEFOLD_DATABASE_URL: options.databaseUrl ?? '' }),
  };
  await promisify(execFile)(process.execPath, ['--import', 'tsx', 'server/cli/prepare.ts'], { env });
  const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { env, stdio: 'pipe' });
  server.stdout!.setEncoding('utf8');
  server.stdout!.on('data', (text: string) => {
    for (const line of text.split('\n').filter(Boolean)) options.onServerOutput?.(line);
  });
  server.stderr!.pipe(process.stderr);
  const worker = options.worker
    ? spawn(process.execPath, ['--import', 'tsx', 'worker/index.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] })
    : null;
  for (let i = 0; i < HEALTH_TRIES; i += 1) {
    if (
      await fetch(`${baseUrl}/api/health`).then(
        (r) => r.ok,
        () => false,
      )
    )
      break;
    await new Promise((done) => setTimeout(done, HEALTH_PAUSE_MS));
  }

  const api = (session: Session, method: string, url: string, body?: unknown) =>
    fetch(`${baseUrl}${url}`, {
      method,
      body: body === undefined ? undefined : JSON.stringify(body),
      headers: { cookie: session.cookie, 'x-csrf-token': session.csrf, 'content-type': 'application/json' },
    });

  async function signIn(role: Role): Promise<Session> {
    const account = DEMO_ACCOUNTS.find((candidate) => candidate.role === role)!;
    const first = await fetch(`${baseUrl}/api/auth/csrf`);
    let cookie = cookieOf(first);
    const signedIn = await fetch(`${baseUrl}/api/auth/sign-in`, {
      method: 'POST',
      body: JSON.stringify({ email: account.email, password: account.password }),
      headers: { cookie, 'content-type': 'application/json', 'x-csrf-token': await tokenOf(first) },
    });
    if (!signedIn.ok) throw new Error(`signing in as the demo ${role} was answered ${signedIn.status}`);
    cookie = cookieOf(signedIn, cookie);
    const second = await fetch(`${baseUrl}/api/auth/csrf`, { headers: { cookie } });
    return { cookie: cookieOf(second, cookie), csrf: await tokenOf(second) };
  }

  function upload(session: Session, file: string, projectId: number) {
    const boundary = '----kinefoldbench';
    const head = Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="projectId"\r\n\r\n${projectId}\r\n` +
        `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${path.basename(file)}"\r\n\r\n`,
    );
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    const length = head.length + fs.statSync(file).size + tail.length;
    return new Promise<{ status: number; body: string }>((resolve, reject) => {
      const request = http.request(
        `${baseUrl}/api/clips`,
        {
          method: 'POST',
          headers: {
            cookie: session.cookie,
            'x-csrf-token': session.csrf,
            'content-length': length,
            'content-type': `multipart/form-data; boundary=${boundary}`,
          },
        },
        (response) => {
          let body = '';
          response.setEncoding('utf8');
          response.on('data', (chunk: string) => {
            body += chunk;
          });
          response.on('end', () => resolve({ status: response.statusCode ?? 0, body }));
        },
      );
      request.on('error', reject);
      request.write(head);
      const stream = fs.createReadStream(file);
      stream.pipe(request, { end: false });
      stream.on('end', () => request.end(tail));
    });
  }

  return {
    baseUrl,
    server,
    signIn,
    api,
    upload,
    async stop() {
      await Promise.all([stopped(server), worker ? stopped(worker) : Promise.resolve()]);
    },
  };
}
