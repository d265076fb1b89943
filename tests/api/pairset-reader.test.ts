import { execFile } from 'node:child_process';
import fs from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiToken } from '../../server/core/people/api-tokens';
import type { PairsetDetail } from '../../shared/types/pairsets';
import { curlCommand } from '../../src/components/pairsets/curl-command';
import { addPairsetClip } from '../helpers/pairset-clips';
import { buildPairsetNow } from '../helpers/pairset-build';
import { addProject } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';

const run = promisify(execFile);
let server: TestServer;
let runtime: TestRuntime;
let listener: Server;
let origin: string;
let pairset: PairsetDetail;
let token: string;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-reader-'));

/** The Python block of "Reading a pairset in Python" in docs/pairsets.md, exactly as written there. */
function documentedReader(): string {
  const doc = fs.readFileSync(path.resolve('docs/pairsets.md'), 'utf8');
  const match = /#+ Reading a pairset in Python\n[\s\S]*?<!-- pairset-reader -->\n```python\n([\s\S]*?)```/.exec(doc);
  if (!match) throw new Error('docs/pairsets.md has no pairset-reader block under "Reading a pairset in Python"');
  return match[1]!;
}

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  const engineer = await addUser(server, 'engineer');
  const admin = await addUser(server, 'admin');
  const project = await addProject(admin.id, 'valley');
  for (let seed = 0; seed < 4; seed += 1) {
    await addPairsetClip(server, { projectId: project.id, uploaderId: admin.id, frames: 9, seed, cutsBefore: [5] });
  }
  pairset = await buildPairsetNow(runtime, engineer, {
    projectIds: [project.id],
    views: ['frame', 'neighbour', 'luma', 'motion'],
    deltas: [1],
    graph: 'full',
    split: { val: 0.5, seed: 2 },
    shardMB: 0.1,
  });
  token = (await createApiToken(engineer.id, 'reader test')).token;
  listener = server.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => listener.once('listening', () => resolve()));
  origin = `http://127.0.0.1:${(listener.address() as AddressInfo).port}`;
});
afterAll(async () => {
  listener?.closeAllConnections();
  await new Promise<void>((resolve) => (listener ? listener.close(() => resolve()) : resolve()));
  await runtime?.close();
  await server?.close();
  fs.rmSync(work, { recursive: true, force: true });
});

const bash = (script: string) =>
  run('bash', ['-euo', 'pipefail', '-c', script], { cwd: work, env: { ...process.env, KINEFOLD_TOKEN: token } });

describe('downloading and reading a pairset with scripts', () => {
  it("downloads every shard with the page's script and the token, and sha256sum accepts each", async () => {
    expect(pairset.state).toBe('built');
    expect(pairset.shards.length).toBeGreaterThan(2);
    const { stdout } = await bash(curlCommand(origin, pairset.id));
    for (const shard of pairset.shards) expect(stdout).toContain(`${shard.file}: OK`);
    const folder = path.join(work, `pairset-${pairset.id}`);
    expect(JSON.parse(fs.readFileSync(path.join(folder, 'pairset.json'), 'utf8')).shards).toEqual(pairset.shards);
  });

  it('is one loop over pairset.json, as long for 55 shards as for one', () => {
    const script = curlCommand(origin, pairset.id);
    expect(script.split('\n')).toHaveLength(11);
    expect(script).not.toContain(pairset.shards[0]!.file);
  });

  it('run again, skips complete shards without a request, resumes a partial one and fetches a missing one', async () => {
    const folder = path.join(work, `pairset-${pairset.id}`);
    const [partial, missing, complete] = pairset.shards.map((shard) => path.join(folder, shard.file));
    const wholePartial = fs.readFileSync(partial!);
    fs.truncateSync(partial!, Math.floor(wholePartial.length / 2));
    fs.rmSync(missing!);
    const untouched = new Date('2031-05-04T10:00:00Z');
    fs.utimesSync(complete!, untouched, untouched);

    // Before, every finished shard made curl ask for bytes past its end, answered 416, and `curl -f` failed with
    // "curl: (22) The requested URL returned error: 416". Only curl's own error line counts: the progress meter on
    // stderr prints speeds such as "8416k", which a bare /416/ once matched.
    const { stdout, stderr } = await bash(curlCommand(origin, pairset.id));
    expect(stderr).not.toMatch(/^curl: \(\d+\)/m);
    expect(stderr).not.toMatch(/returned error/i);
    for (const shard of pairset.shards) expect(stdout).toContain(`${shard.file}: OK`);
    expect(fs.readFileSync(partial!).equals(wholePartial)).toBe(true);
    expect(fs.statSync(complete!).mtime).toEqual(untouched);
    expect(fs.statSync(missing!).size).toBe(pairset.shards[1]!.bytes);
  });

  it('runs the Python reader in docs/pairsets.md: checksums verified, every pair read, .flo decoded', async () => {
    const script = path.join(work, 'read_pairset.py');
    fs.writeFileSync(script, documentedReader());
    const { stdout } = await run('python3', [script, path.join(work, `pairset-${pairset.id}`)]);
    const result = JSON.parse(stdout) as { pairs: Record<string, number>; flo_fields: number };
    const expected = Object.fromEntries(pairset.stats!.kinds.map((kind) => [kind.kind, kind.total]));
    expect(result.pairs).toEqual(expected);
    const withMotion = pairset.stats!.kinds.filter((kind) => kind.b === 'motion');
    expect(result.flo_fields).toBe(withMotion.reduce((sum, kind) => sum + kind.total, 0));
  });

  it('has the Python reader name missing and partial shards and read the complete ones', async () => {
    const copy = path.join(work, 'partial');
    fs.cpSync(path.join(work, `pairset-${pairset.id}`), copy, { recursive: true });
    const [first, second] = pairset.shards;
    fs.rmSync(path.join(copy, first!.file));
    fs.truncateSync(path.join(copy, second!.file), 1000);
    const script = path.join(work, 'read_pairset.py');
    const { stdout, stderr } = await run('python3', [script, copy]);
    expect(stderr).toContain(
      `not read, missing or incomplete: ${first!.file}, ${second!.file} (1000 of ${second!.bytes} bytes)`,
    );
    const result = JSON.parse(stdout) as { pairs: Record<string, number>; missing: string[] };
    expect(result.missing).toHaveLength(2);
    const read = Object.values(result.pairs).reduce((sum, count) => sum + count, 0);
    expect(read).toBe(pairset.shards.slice(2).reduce((sum, shard) => sum + shard.pairCount, 0));
    expect(read).toBeGreaterThan(0);
  });

  it('has the Python reader stop on a shard whose SHA-256 does not match', async () => {
    const copy = path.join(work, 'damaged');
    fs.cpSync(path.join(work, `pairset-${pairset.id}`), copy, { recursive: true });
    const victim = path.join(copy, pairset.shards.at(-1)!.file);
    const bytes = fs.readFileSync(victim);
    bytes[700] ^= 0xff;
    fs.writeFileSync(victim, bytes);
    const script = path.join(work, 'read_pairset.py');
    await expect(run('python3', [script, copy])).rejects.toMatchObject({
      stderr: expect.stringContaining(`${pairset.shards.at(-1)!.file}: SHA-256 does not match pairset.json`),
    });
  });
});
