/**
 * Storage benchmark (not a test): a generated 60 s 1280×720 clip and the demo campaign's footage are uploaded to a
 * real server and processed by a real worker at a new project's defaults. Prints, per footage hour and by kind,
 * what Kinefold keeps (lossless WebP frames, packed forward fields, no stored views or pictures) beside what the
 * original format kept for the same clips in the same run (PNG frames, float32 .flo fields both ways, colour
 * pictures, luma and chroma PNGs, each made here from the stored frames and fields with the encoders it used),
 * beside the sources; and the admission's prediction of each clip's derived bytes against the measured bytes.
 * Goals: derived bytes ≤ 3 GB per footage hour; every prediction within ±25 %.
 *   npm run bench:storage [-- --seconds 60]
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { motionFieldFile } from '../server/core/clips/clip-motion';
import { loadConfig } from '../server/core/config';
import { openKinefoldDatabase } from '../server/core/db/open';
import { readRgbImage, rgbPng } from '../server/core/media/frame-images';
import { viewCodes, viewCodesPng } from '../server/core/media/frame-views';
import { Clip } from '../server/core/models';
import { clipStoredUsage } from '../server/core/storage/stored-usage';
import { storagePaths } from '../server/core/storage/paths';
import { renderDemoClip } from '../server/demo/footage';
import { DEMO_CLIPS } from '../server/demo/scenario';
import { floByteLength } from '../shared/motion/formats/flo';
import type { ClipSummary } from '../shared/types/clips';
import { startRunningApp } from '../tests/helpers/app-processes';
import { renderRowPassClip } from './row-pass-clip';
import { createFolderStore } from '../server/core/storage/folder-store';

const { values } = parseArgs({ options: { seconds: { type: 'string', default: '60' } } });
const SECONDS = Math.max(5, Number(values.seconds));
const GOAL_BYTES_PER_HOUR = 3e9;
const GOAL_PREDICTION_ERROR = 0.25;
const POLL_MS = 500;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-storage-'));
const storageDir = path.join(work, 'storage');
const gb = (bytes: number) => `${(bytes / 1e9).toFixed(2)} GB`;

interface Measured {
  group: string;
  name: string;
  durationS: number;
  source: number;
  /** What Kinefold keeps now, by kind. */
  kept: { frames: number; motion: number; preview: number };
  /** What the original format kept for the same clip. */
  original: { frames: number; motion: number; views: number; preview: number };
  predicted: number;
}

interface Phase {
  group: string;
  files: string[];
  /** A quota for the phase's project, as a share of the bytes the first phase's demo clips ended with. */
  quotaShareOfDemo?: number;
}

interface Uploaded {
  groups: Map<number, string>;
  /** The quota-edge project: its quota, what it ended with, and how many uploads it refused. */
  edge: { quotaBytes: number; usedBytes: number; refused: number } | null;
}

/** Uploads each phase into a project of its own and waits for processing; a refused upload counts only in a quota. */
async function uploadAll(phases: Phase[]): Promise<Uploaded> {
  const app = await startRunningApp(storageDir, { worker: true });
  try {
    const session = await app.signIn('admin');
    const groups = new Map<number, string>();
    const get = async <T>(url: string) => (await (await app.api(session, 'GET', url)).json()) as T;
    let edge: Uploaded['edge'] = null;
    for (const phase of phases) {
      const demoBytes = [...groups.entries()].filter(([, group]) => group === 'demo').map(([id]) => id);
      const stored = await Promise.all(demoBytes.map((id) => get<ClipSummary>(`/api/clips/${id}`)));
      const quotaBytes = phase.quotaShareOfDemo
        ? Math.round(phase.quotaShareOfDemo * stored.reduce((sum, clip) => sum + clip.storedBytes, 0))
        : null;
      const created = await app.api(session, 'POST', '/api/projects', { name: `Storage: ${phase.group}`, quotaBytes });
      const project = (await created.json()) as { id: number; settings: Record<string, unknown> };
      if (phase === phases[0]) console.log(`project defaults: ${JSON.stringify(project.settings)}`);
      let refused = 0;
      for (const file of phase.files) {
        const answer = await app.upload(session, file, project.id);
        if (answer.status === 413 && quotaBytes !== null) refused += 1;
        else if (answer.status !== 201) {
          throw new Error(`${path.basename(file)} was answered ${answer.status}: ${answer.body}`);
        } else groups.set((JSON.parse(answer.body) as ClipSummary).id, phase.group);
      }
      for (;;) {
        const clips = await Promise.all([...groups.keys()].map((id) => get<ClipSummary>(`/api/clips/${id}`)));
        if (clips.every((clip) => clip.state !== 'queued' && clip.state !== 'processing')) {
          const failed = clips.filter((clip) => clip.state === 'failed');
          if (failed.length) throw new Error(`failed: ${failed.map((clip) => `${clip.originalName}: ${clip.error}`)}`);
          break;
        }
        await new Promise((done) => setTimeout(done, POLL_MS));
      }
      if (quotaBytes !== null) {
        const { usedBytes } = await get<{ usedBytes: number }>(`/api/projects/${project.id}`);
        edge = { quotaBytes, usedBytes, refused };
      }
    }
    return { groups, edge };
  } finally {
    await app.stop();
  }
}

/** The clip's files now, and the original format's files made from them with the encoders it used. */
async function measure(clip: Clip, group: string): Promise<Measured> {
  const paths = storagePaths(storageDir);
  const layout = paths.clipDerived(clip.id);
  const usage = await clipStoredUsage(createFolderStore(storageDir), clip.id);
  let framesPng = 0;
  let views = 0;
  for (let index = 0; index < clip.frameCount!; index += 1) {
    const image = await readRgbImage(layout.frame(index));
    framesPng += (await rgbPng(image.rgb, image.width, image.height)).length;
    const codes = viewCodes(image);
    views += (await viewCodesPng(codes, 'luma')).length + (await viewCodesPng(codes, 'chroma')).length;
  }
  let motion = 0;
  for (const name of fs.readdirSync(layout.motionDir)) {
    const index = Number(name.slice(0, 6));
    const { width, height } = await readRgbImage(layout.frame(index));
    const picture = await motionFieldFile(clip.id, index, 'picture', createFolderStore(paths.root));
    motion += 2 * floByteLength(width, height) + picture.length;
  }
  return {
    group,
    name: clip.originalName,
    durationS: clip.durationS,
    source: Number(clip.sizeBytes),
    kept: { frames: usage.byKind.frames, motion: usage.byKind.motion, preview: usage.byKind.preview },
    original: { frames: framesPng, motion, views, preview: usage.byKind.preview },
    predicted: Number(clip.predictedDerivedBytes ?? 0),
  };
}

function report(title: string, rows: Measured[]): boolean {
  const hours = rows.reduce((sum, row) => sum + row.durationS, 0) / 3600;
  const perHour = (pick: (row: Measured) => number) => rows.reduce((sum, row) => sum + pick(row), 0) / hours;
  const kinds = ['frames', 'motion', 'views', 'preview'] as const;
  console.log(`\n${title}: ${rows.length} clips, ${(hours * 3600).toFixed(0)} s of footage; bytes per footage hour`);
  console.log('  kind       Kinefold now   original format   ratio');
  let keptTotal = 0;
  let originalTotal = 0;
  for (const kind of kinds) {
    const kept = kind === 'views' ? 0 : perHour((row) => row.kept[kind]);
    const original = perHour((row) => row.original[kind]);
    keptTotal += kept;
    originalTotal += original;
    const ratio = original > 0 ? `${((100 * kept) / original).toFixed(1)} %` : '';
    console.log(`  ${kind.padEnd(9)}  ${gb(kept).padStart(12)}   ${gb(original).padStart(15)}   ${ratio.padStart(7)}`);
  }
  console.log(
    `  derived    ${gb(keptTotal).padStart(12)}   ${gb(originalTotal).padStart(15)}   ` +
      `${((100 * keptTotal) / originalTotal).toFixed(1).padStart(5)} %`,
  );
  const sources = perHour((row) => row.source);
  console.log(`  sources    ${gb(sources).padStart(12)}   derived ÷ sources: ${(keptTotal / sources).toFixed(1)}×`);
  console.log(`  (motion in the original format: float32 .flo both ways and a colour picture per field)`);
  const errors = rows.map((row) => {
    const real = row.kept.frames + row.kept.motion + row.kept.preview;
    return { name: row.name, error: row.predicted / real - 1 };
  });
  const worst = errors.reduce((a, b) => (Math.abs(b.error) > Math.abs(a.error) ? b : a));
  const fmt = (error: number) => `${error >= 0 ? '+' : ''}${(100 * error).toFixed(1)} %`;
  console.log(
    `  prediction error (predicted ÷ measured − 1): ${errors.map((e) => fmt(e.error)).join(', ')}; ` +
      `worst ${fmt(worst.error)} (${worst.name})`,
  );
  const bytesMet = keptTotal <= GOAL_BYTES_PER_HOUR;
  const predictionMet = errors.every((e) => Math.abs(e.error) <= GOAL_PREDICTION_ERROR);
  console.log(
    `  goal ≤ ${gb(GOAL_BYTES_PER_HOUR)} per footage hour: ${bytesMet ? 'met' : 'NOT met'}; ` +
      `goal every prediction within ±${GOAL_PREDICTION_ERROR * 100} %: ${predictionMet ? 'met' : 'NOT met'}`,
  );
  return bytesMet && predictionMet;
}

/** Goal: the project never ends above its quota by more than one clip's prediction error. */
function reportQuotaEdge(edge: NonNullable<Uploaded['edge']>, rows: Measured[]): boolean {
  const errors = rows.map((row) => Math.abs(row.predicted - (row.kept.frames + row.kept.motion + row.kept.preview)));
  const largest = Math.max(0, ...errors);
  const over = edge.usedBytes - edge.quotaBytes;
  const met = over <= largest;
  console.log(
    `\nquota edge: quota ${(edge.quotaBytes / 1e6).toFixed(1)} MB, ${rows.length} clips admitted, ${edge.refused} ` +
      `refused with 413; ended with ${(edge.usedBytes / 1e6).toFixed(1)} MB (${over > 0 ? 'over' : 'under'} by ` +
      `${(Math.abs(over) / 1e6).toFixed(2)} MB); largest single-clip prediction error ${(largest / 1e6).toFixed(2)} MB; ` +
      `goal (never over by more than one clip's error): ${met ? 'met' : 'NOT met'}`,
  );
  return met;
}

try {
  console.log(`rendering a ${SECONDS} s 1280×720 clip and ${DEMO_CLIPS.length} demo clips in ${work}`);
  const rowPass = await renderRowPassClip(work, SECONDS);
  const demoFiles: string[] = [];
  for (const recipe of DEMO_CLIPS) demoFiles.push(await renderDemoClip(work, recipe));
  const started = performance.now();
  const { groups, edge } = await uploadAll([
    { group: 'row pass', files: [rowPass] },
    { group: 'demo', files: demoFiles },
    // The demo's clips again into a project whose quota holds about 40 % of them.
    { group: 'quota edge', files: demoFiles, quotaShareOfDemo: 0.4 },
  ]);
  console.log(`processed in ${((performance.now() - started) / 1000).toFixed(0)} s`);
  const sequelize = await openKinefoldDatabase(loadConfig({ KINEFOLD_STORAGE_DIR: storageDir, KINEFOLD_DEMO: 'off' }));
  try {
    const measured: Measured[] = [];
    for (const clip of await Clip.findAll({ order: [['id', 'ASC']] })) {
      measured.push(await measure(clip, groups.get(clip.id)!));
    }
    const of = (group: string) => measured.filter((row) => row.group === group);
    const rowPassMet = report(`${SECONDS} s 1280×720 row pass`, of('row pass'));
    const demoMet = report('demo campaign', of('demo'));
    const edgeMet = reportQuotaEdge(edge!, of('quota edge'));
    console.log(`\nevery measured case meets every goal: ${rowPassMet && demoMet && edgeMet ? 'yes' : 'no'}`);
  } finally {
    await sequelize.close();
  }
} finally {
  fs.rmSync(work, { recursive: true, force: true });
}
