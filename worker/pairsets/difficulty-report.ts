import { decodeChroma, decodeLuma } from '../../shared/colour/view-encoding';
import { createFixedEmbedder, DEFAULT_FIXED_EMBEDDING } from '../../shared/pairing/fixed-embedding';
import { pairDifficulty } from '../../shared/pairing/pair-difficulty';
import type { PlannedPair } from '../../shared/pairing/pair-plan';
import type { ViewName, ViewPair } from '../../shared/pairing/pairing-graph';
import { mulberry32, shuffleInPlace } from '../../shared/pairing/seeded-random';
import { viewDescriptor } from '../../shared/pairing/view-descriptor';
import { viewPlane, type ViewData } from '../../shared/pairing/view-plane';
import type { PairsetDifficulty } from '../../shared/types/pairsets';
import type { FramePool } from '../pool/frame-pool';
import { criticReport, CRITIC_SAMPLE, type EmbeddedPair, type EmbeddedView } from './critic-report';
import { viewFrame } from './pair-members';
import type { ViewReader } from './view-reader';

/** Batch sizes of the report (1 positive + K − 1 negatives); a K is reported when the sample fills a batch. */
export const DIFFICULTY_KS = [16, 64, 256] as const;
/** Pairs drawn per view pair: two batches at the largest K. */
export const DIFFICULTY_SAMPLE = 2 * DIFFICULTY_KS[DIFFICULTY_KS.length - 1];

const EMBEDDING_DESCRIPTION =
  'Each view becomes one grey plane (frames: BT.601 grey; luma: L*; chroma: C*ab; ' +
  'motion: flow magnitude), shrunk to a 16 × 16 thumbnail by area averaging, its mean removed, projected to 128 ' +
  'dimensions by a seeded Gaussian random matrix and normalised to unit length. Nothing is trained.';

export interface DifficultyOptions {
  reader: ViewReader;
  /** Trains the critics, one view pair per task. */
  pool: FramePool;
  signal?: AbortSignal;
  temperature: number;
  /** The pairset's split seed: the same pairset always draws the same sample. */
  seed: number;
  /** Called between views with the share of the report done; may throw to stop (cancel, shutdown). */
  progress(share: number): Promise<void>;
}

/**
 * The pair-difficulty report of a build (DESIGN §2): for each view pair, a seeded sample of its pairs, each view
 * embedded with the fixed embedding, and InfoNCE at each K the sample fills (shared/pairing/pair-difficulty.ts);
 * then a critic trained per view pair on a sample of the train split and measured on one of the val split
 * (critic-report.ts). Views are read from the clips' stored files at the working size, so the output size does
 * not change the report.
 */
export async function difficultyReport(
  planned: readonly PlannedPair[],
  pairs: readonly ViewPair[],
  options: DifficultyOptions,
): Promise<PairsetDifficulty> {
  const embed = createFixedEmbedder(DEFAULT_FIXED_EMBEDDING);
  const cache = new Map<string, EmbeddedView>();
  const ofKind = pairs.map((pair) => planned.filter((item) => item.pair.kind === pair.kind));
  const samples = ofKind.map((items) => sample(items, options.seed, DIFFICULTY_SAMPLE));
  const trainSamples = ofKind.map((items) =>
    sample(
      items.filter((item) => item.split === 'train'),
      options.seed,
      CRITIC_SAMPLE,
    ),
  );
  const heldOutSamples = ofKind.map((items) =>
    sample(
      items.filter((item) => item.split === 'val'),
      options.seed,
      CRITIC_SAMPLE,
    ),
  );
  const totalViews = 2 * [...samples, ...trainSamples, ...heldOutSamples].reduce((sum, items) => sum + items.length, 0);
  let doneViews = 0;
  // Reading a view dominates the report; the views are read at most once and give both representations.
  const embedView = async (item: PlannedPair, view: ViewName): Promise<EmbeddedView> => {
    const key = `${item.clipId}:${planeKind(view)}:${viewFrame(view, item.moment)}`;
    let embedded = cache.get(key);
    if (!embedded) {
      const data = await readView(options.reader, item.clipId, item.moment, view);
      const plane = viewPlane(data);
      embedded = {
        fixed: embed(plane, data.width, data.height),
        descriptor: viewDescriptor(plane, data.width, data.height),
      };
      cache.set(key, embedded);
    }
    doneViews += 1;
    await options.progress(doneViews / totalViews);
    return embedded;
  };
  const embedPairs = async (items: PlannedPair[], pair: ViewPair): Promise<EmbeddedPair[]> => {
    const out: EmbeddedPair[] = [];
    for (const item of items) {
      const a = await embedView(item, pair.a);
      const b = await embedView(item, pair.b);
      out.push({ clipId: item.clipId, a, b });
    }
    return out;
  };
  const kinds = [];
  const criticInputs = [];
  for (const [k, pair] of pairs.entries()) {
    const embedded = await embedPairs(samples[k]!, pair);
    const a = embedded.map((item) => item.a.fixed);
    const b = embedded.map((item) => item.b.fixed);
    const results = DIFFICULTY_KS.map((size) =>
      pairDifficulty(a, b, size, {
        temperature: options.temperature,
        seed: options.seed,
      }),
    ).filter((result) => result !== null);
    kinds.push({ kind: pair.kind, sampled: embedded.length, results });
    criticInputs.push({
      kind: pair.kind,
      tied: planeKind(pair.a) === planeKind(pair.b),
      train: await embedPairs(trainSamples[k]!, pair),
      heldOut: await embedPairs(heldOutSamples[k]!, pair),
    });
  }
  const critic = await criticReport(criticInputs, {
    pool: options.pool,
    signal: options.signal,
    temperature: options.temperature,
    seed: options.seed,
    ks: [...DIFFICULTY_KS],
  });
  return {
    temperature: options.temperature,
    ks: [...DIFFICULTY_KS],
    sampleLimit: DIFFICULTY_SAMPLE,
    embedding: { description: EMBEDDING_DESCRIPTION, ...DEFAULT_FIXED_EMBEDDING },
    kinds,
    critic,
  };
}

/** Which stored picture a view reads: a neighbour is another frame of the same kind as the frame. */
function planeKind(view: ViewName): 'frame' | 'luma' | 'chroma' | 'motion' {
  return view === 'motion' || view === 'luma' || view === 'chroma' ? view : 'frame';
}

/** Up to `limit` pairs, drawn with the seed. */
function sample(items: PlannedPair[], seed: number, limit: number): PlannedPair[] {
  return shuffleInPlace([...items], mulberry32(seed)).slice(0, limit);
}

/** The pixels view-plane.ts takes for a view of a moment: luma and chroma as their stored codes decode. */
async function readView(reader: ViewReader, clipId: number, moment: number, view: ViewName): Promise<ViewData> {
  if (view === 'motion') {
    const { width, height, flow } = await reader.field(clipId, moment);
    const u = new Float32Array(width * height);
    const v = new Float32Array(width * height);
    for (let p = 0; p < u.length; p += 1) {
      u[p] = flow[2 * p];
      v[p] = flow[2 * p + 1];
    }
    return { kind: 'motion', width, height, u, v };
  }
  const frame = viewFrame(view, moment);
  if (view === 'luma' || view === 'chroma') {
    const { width, height, luma, chroma } = await reader.views(clipId, frame);
    if (view === 'luma') return { kind: 'luma', width, height, l: decodeLuma(luma) };
    const a = new Float32Array(width * height);
    const b = new Float32Array(width * height);
    decodeChroma(chroma, a, b);
    return { kind: 'chroma', width, height, a, b };
  }
  const image = await reader.frame(clipId, frame);
  return { kind: 'frame', width: image.width, height: image.height, rgb: image.rgb };
}
