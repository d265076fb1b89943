/**
 * Motion benchmark (not a test): pairs per second and average endpoint error (AEE) of every Kinefold estimator on
 * pairs with known motion, on one thread (in a process of its own, as native OpenCV's) and across a worker-thread
 * pool (one thread per core), side by side with
 * native OpenCV (Debian's python3-opencv, one thread: Farnebäck with the same parameters and the DIS presets, through
 * ../shared/tools/opencv-reference.py beside the checkout) on the same 8-bit frames in the same run. Ratios are ours / native.
 *   npm run bench:motion [-- --runs 10 --rounds 3]
 * Pairs: a textured image shifted with known truth (tests/helpers/motion-pairs.ts) at 320×180 and 640×360, a large
 * shift at 640×360, and Middlebury Grove3 (640×480, tests/helpers/grove3.ts; fetch with
 * `bash tests/fixtures/fetch-grove3.sh`). AEE is over every pixel with known truth, as the OpenCV script counts it
 * (the unit tests leave a 16 px border out, so their figures are lower).
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs, promisify } from 'node:util';
import { Piscina } from 'piscina';
import sharp from 'sharp';
import { isUnknownFlow } from '../shared/motion/unknown-flow';
import { grove3Available, GROVE3_FETCH_COMMAND, loadGrove3 } from '../tests/helpers/grove3';
import { makeMotionPair, type Warp } from '../tests/helpers/motion-pairs';
import { encodeFlo } from '../shared/motion/formats/flo';
import { resolveParams } from '../worker/motion/index';
import { ESTIMATORS, type EstimatorName } from '../shared/estimators';
import { warpBackward } from '../worker/motion/kernels/resample';
import type { OneThreadFigures } from './motion-one-thread';
import type { BenchPairTask } from './motion-thread';

const { values } = parseArgs({
  options: { runs: { type: 'string', default: '10' }, rounds: { type: 'string', default: '3' } },
});
const RUNS = Math.max(1, Number(values.runs));
/** Rounds alternate ours and native on each pair; each method keeps its best round (the machine is shared). */
const ROUNDS = Math.max(1, Number(values.rounds));
const THREADS = os.availableParallelism();
const PYTHON = '/usr/bin/python3';
/** The design notes' reference script, beside the checkout (`../shared/tools/`), never at a fixed absolute path. */
const REFERENCE = fileURLToPath(new URL('../../shared/tools/opencv-reference.py', import.meta.url));
const ONE_THREAD = fileURLToPath(new URL('./motion-one-thread.ts', import.meta.url));
const NATIVE = ['farneback', 'dis-fast', 'dis-medium'] as const;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-motion-'));

interface Pair {
  name: string;
  width: number;
  height: number;
  /** Grey levels rounded to 8 bits, exactly what OpenCV reads from the PNG. */
  prev: Float32Array;
  next: Float32Array;
  truth: Float32Array;
}

interface Figures {
  /** One thread, ms per pair. */
  ms: number;
  poolPairsPerS: number;
  aee: number;
}

type NativeFigures = Record<(typeof NATIVE)[number], { ms: number; aee: number }>;

const toByte = (frame: Float32Array) => Float32Array.from(frame, (v) => Math.min(255, Math.max(0, Math.round(v))));

function generated(name: string, width: number, height: number, warp: Warp): Pair {
  const pair = makeMotionPair(width, height, warp);
  return { name, width, height, prev: toByte(pair.prev), next: toByte(pair.next), truth: pair.truth };
}

/** Grove3's first frame is grove3.png warped backward by the true field, so the truth holds from it to grove3.png. */
async function grove3(): Promise<Pair> {
  const grove = await loadGrove3();
  const usable = grove.truth.slice();
  for (let i = 0; i < usable.length; i += 2) if (isUnknownFlow(usable[i]!, usable[i + 1]!)) usable.fill(0, i, i + 2);
  const first = new Float32Array(grove.grey.length);
  warpBackward(grove.grey, grove.width, grove.height, usable, first);
  const { width, height } = grove;
  return {
    name: `Grove3 ${width}×${height}`,
    width,
    height,
    prev: toByte(first),
    next: toByte(grove.grey),
    truth: grove.truth,
  };
}

/** Our estimators on one thread, in a process of their own (see motion-one-thread.ts), on the pair's raw files. */
async function oneThread(pair: Pair, base: string): Promise<OneThreadFigures> {
  const { stdout } = await promisify(execFile)(
    process.execPath,
    ['--import', 'tsx', ONE_THREAD, base, String(pair.width), String(pair.height), String(RUNS)],
    { maxBuffer: 1 << 20 },
  );
  return JSON.parse(stdout) as OneThreadFigures;
}

function shared(frame: Float32Array): SharedArrayBuffer {
  const buffer = new SharedArrayBuffer(frame.byteLength);
  new Float32Array(buffer).set(frame);
  return buffer;
}

/** Pairs per second with RUNS·THREADS tasks in flight on the pool, after one warm-up task per thread. */
async function withPool(pool: Piscina, pair: Pair, estimator: EstimatorName): Promise<number> {
  const task: BenchPairTask = {
    estimator,
    params: resolveParams(estimator),
    width: pair.width,
    height: pair.height,
    prev: shared(pair.prev),
    next: shared(pair.next),
  };
  await Promise.all(Array.from({ length: THREADS }, () => pool.run(task)));
  const count = RUNS * THREADS;
  const start = performance.now();
  await Promise.all(Array.from({ length: count }, () => pool.run(task)));
  return (count * 1000) / (performance.now() - start);
}

async function writeGreyPng(frame: Float32Array, width: number, height: number, file: string): Promise<string> {
  await sharp(Buffer.from(Uint8Array.from(frame)), { raw: { width, height, channels: 1 } })
    .png()
    .toFile(file);
  return file;
}

/**
 * The pair as OpenCV reads it (two 8-bit grey PNGs and the truth as .flo) and as our one-thread process reads it
 * (raw float32 files beside them); answers OpenCV's three paths and the base of the raw files.
 */
async function writePair(pair: Pair, index: number): Promise<{ files: string[]; base: string }> {
  const base = path.join(work, `pair-${index}`);
  const a = await writeGreyPng(pair.prev, pair.width, pair.height, `${base}-a.png`);
  const b = await writeGreyPng(pair.next, pair.width, pair.height, `${base}-b.png`);
  fs.writeFileSync(`${base}-truth.flo`, encodeFlo(pair.truth, pair.width, pair.height));
  for (const [suffix, data] of [
    ['a', pair.prev],
    ['b', pair.next],
    ['truth', pair.truth],
  ] as const) {
    fs.writeFileSync(`${base}-${suffix}.f32`, Buffer.from(data.buffer, data.byteOffset, data.byteLength));
  }
  return { files: [a, b, `${base}-truth.flo`], base };
}

/** Native OpenCV on the same frames, one thread; null when Debian's python3-opencv is missing. */
async function native(files: string[]): Promise<NativeFigures | null> {
  try {
    const { stdout } = await promisify(execFile)(
      PYTHON,
      [REFERENCE, ...files, '--runs', String(RUNS), '--threads', '1'],
      { cwd: work, maxBuffer: 1 << 20 },
    );
    const report = JSON.parse(stdout) as Record<string, NativeFigures>;
    // The tuned allocator spares OpenCV the page faults of fresh large buffers: the stricter reference.
    return report['tuned-allocator']!;
  } catch (error) {
    console.warn(
      `native OpenCV not measured (${(error as Error).message.split('\n')[0]}); ` +
        'install it with: apt-get install -y python3-opencv',
    );
    return null;
  }
}

/** Each native method's faster round. */
function best(a: NativeFigures | null, b: NativeFigures | null): NativeFigures | null {
  if (!a || !b) return a ?? b;
  const faster = (method: (typeof NATIVE)[number]) => (a[method].ms <= b[method].ms ? a[method] : b[method]);
  return Object.fromEntries(NATIVE.map((method) => [method, faster(method)])) as NativeFigures;
}

function report(pair: Pair, ours: Map<EstimatorName, Figures>, reference: NativeFigures | null): void {
  const fb = reference ? 1000 / reference.farneback.ms : undefined;
  const dis = reference ? 1000 / reference['dis-medium'].ms : undefined;
  for (const [estimator, { ms, poolPairsPerS, aee }] of ours) {
    const pairsPerS = 1000 / ms;
    console.log(
      `| ${pair.name} | ${estimator} | ${fmt(ms)} | ${fmt(pairsPerS)} | ${fmt(poolPairsPerS)} | ` +
        `${fmt(aee, 3)} | ${ratio(pairsPerS, fb)} | ${ratio(poolPairsPerS, fb)} | ${ratio(pairsPerS, dis)} | ` +
        `${ratio(poolPairsPerS, dis)} | ${ratio(aee, reference?.farneback.aee)} |`,
    );
  }
  for (const method of reference ? NATIVE : []) {
    const { ms, aee } = reference![method];
    const figures = `${fmt(ms)} | ${fmt(1000 / ms)} | — | ${fmt(aee, 3)}`;
    console.log(`| ${pair.name} | OpenCV ${method} (native) | ${figures} | | | | | |`);
  }
}

const fmt = (value: number, digits = 1) => value.toFixed(digits);
const ratio = (ours: number, theirs: number | undefined) =>
  theirs === undefined ? '—' : `${(ours / theirs).toFixed(2)}×`;

async function main(): Promise<void> {
  const pairs: Pair[] = [
    generated('shift (2.5, −1.5) 320×180', 320, 180, { kind: 'shift', dx: 2.5, dy: -1.5 }),
    generated('shift (5, −3) 640×360', 640, 360, { kind: 'shift', dx: 5, dy: -3 }),
    generated('large shift (30.5, −12.25) 640×360', 640, 360, { kind: 'shift', dx: 30.5, dy: -12.25 }),
  ];
  if (grove3Available()) pairs.push(await grove3());
  else console.warn(`Grove3 left out: data missing, fetch it with: ${GROVE3_FETCH_COMMAND}`);

  const pool = new Piscina({
    filename: new URL('./motion-thread-entry.mjs', import.meta.url).href,
    execArgv: [],
    minThreads: THREADS,
    maxThreads: THREADS,
    idleTimeout: 60_000,
  });
  const load = os
    .loadavg()
    .map((value) => value.toFixed(2))
    .join(' ');
  console.log(
    `Kinefold motion benchmark: median of ${RUNS} runs, best of ${ROUNDS} rounds, pool of ${THREADS} ` +
      `threads, Node ${process.version}, ${os.cpus()[0]?.model ?? 'unknown CPU'}, load average ${load} at the start.`,
  );
  console.log(
    'Ratios: pairs/s against native OpenCV Farnebäck and DIS medium on one thread; AEE against native ' +
      'Farnebäck (below 1 is better).\n',
  );
  console.log(
    '| pair | method | ms/pair | pairs/s | pool pairs/s | AEE px | ×FB 1 thread | ×FB pool ' +
      '| ×DIS-m 1 thread | ×DIS-m pool | AEE ÷ FB |',
  );
  console.log('|---|---|---|---|---|---|---|---|---|---|---|');
  try {
    for (const [index, pair] of pairs.entries()) {
      const { files, base } = await writePair(pair, index);
      const ours = new Map<EstimatorName, Figures>();
      let reference: NativeFigures | null = null;
      for (let round = 0; round < ROUNDS; round++) {
        reference = best(reference, await native(files));
        const singles = await oneThread(pair, base);
        for (const estimator of ESTIMATORS) {
          const single = singles[estimator];
          const poolPairsPerS = await withPool(pool, pair, estimator);
          const previous = ours.get(estimator);
          ours.set(estimator, {
            ms: Math.min(single.ms, previous?.ms ?? Infinity),
            poolPairsPerS: Math.max(poolPairsPerS, previous?.poolPairsPerS ?? 0),
            aee: single.aee,
          });
        }
      }
      report(pair, ours, reference);
    }
  } finally {
    await pool.destroy();
    fs.rmSync(work, { recursive: true, force: true });
  }
}

await main();
