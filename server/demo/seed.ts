import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Config } from '../core/config';
import { AppError } from '../core/errors';
import { Clip, Project, User } from '../core/models';
import { admitUpload } from '../core/clips/clip-admission';
import { createProject } from '../core/projects/projects';
import { reserveUpload } from '../core/usage/quotas';
import { storagePaths } from '../core/storage/paths';
import { renderDemoClip, renderDuplicate, writeNotAVideo } from './footage';
import { DEMO_CLIPS, DEMO_DUPLICATE, DEMO_PROJECTS, type DemoClipRecipe } from './scenario';
import { createObjectStore } from '../core/storage/open-store';

const log = (message: string) => console.log(`Kinefold demo: ${message}`);

const DEMO_FILES = [...DEMO_CLIPS.map((recipe) => recipe.file), DEMO_DUPLICATE.file];

/** True once every demo clip is in; a start interrupted half-way carries on where it stopped, never twice. */
export async function demoSeeded(): Promise<boolean> {
  return (await Clip.count({ where: { originalName: DEMO_FILES } })) === DEMO_FILES.length;
}

/**
 * First start with KINEFOLD_DEMO=full: creates the demo projects, renders the footage and sends every file through
 * upload admission as the demo operator (the same reservation, probe and commit an upload gets). The worker
 * process picks the clips up as they arrive; the app is usable meanwhile.
 */
export async function seedDemoCampaign(config: Config): Promise<void> {
  const admin = await User.findByEmail('admin@kinefold.test');
  const operator = await User.findByEmail('operator@kinefold.test');
  if (!admin || !operator) {
    log('the demo accounts are missing (KINEFOLD_DEMO=accounts earlier?); no footage seeded.');
    return;
  }
  const projects = [];
  for (const project of DEMO_PROJECTS) {
    projects.push(
      (await Project.findOne({ where: { name: project.name } })) ??
        (await createProject({ ...project, retentionDays: 30 }, admin.id)),
    );
  }
  const present = new Set(
    (await Clip.findAll({ where: { originalName: DEMO_FILES }, attributes: ['originalName'] })).map(
      (clip) => clip.originalName,
    ),
  );
  log(`${projects.length} projects ready; rendering ${DEMO_FILES.length - present.size} clips with ffmpeg…`);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-demo-'));
  try {
    for (const [index, recipe] of DEMO_CLIPS.entries()) {
      if (present.has(recipe.file)) continue;
      const file = await renderDemoClip(dir, recipe);
      await ingest(file, recipe, projects[recipe.project]!.id, operator.id, config, index);
    }
    const original = DEMO_CLIPS.find((recipe) => recipe.file === DEMO_DUPLICATE.of)!;
    if (!present.has(DEMO_DUPLICATE.file)) {
      if (!fs.existsSync(path.join(dir, original.file))) await renderDemoClip(dir, original);
      await ingest(
        await renderDuplicate(dir),
        { ...original, file: DEMO_DUPLICATE.file, expect: 'duplicate' },
        projects[original.project]!.id,
        operator.id,
        config,
        DEMO_CLIPS.length,
      );
    }
    const notAVideo = writeNotAVideo(dir);
    await ingest(
      notAVideo,
      { ...original, file: path.basename(notAVideo) },
      projects[1]!.id,
      operator.id,
      config,
      DEMO_CLIPS.length + 1,
    );
    log('all footage handed to the worker; clips appear under Clips as they are processed.');
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

async function ingest(
  file: string,
  recipe: DemoClipRecipe,
  projectId: number,
  uploaderId: number,
  config: Config,
  index: number,
): Promise<void> {
  const paths = storagePaths(config.storageDir);
  const incoming = paths.incomingFile(`demo-${index}`);
  fs.mkdirSync(paths.incomingDir, { recursive: true });
  fs.copyFileSync(file, incoming);
  const bytes = fs.readFileSync(incoming);
  const capturedAt = new Date(Date.UTC(2026, 3, 2 + Math.floor(index / 4), 6 + (index % 4) * 2, 15)).toISOString();
  try {
    const reservationId = await reserveUpload(projectId, uploaderId, bytes.length);
    const clip = await admitUpload(
      {
        path: incoming,
        size: bytes.length,
        reservationId,
        sha256: createHash('sha256').update(bytes).digest('hex'),
        fields: { projectId, site: recipe.site, rig: recipe.rig, capturedAt, tags: recipe.tags, notes: recipe.notes },
      },
      path.basename(file),
      uploaderId,
      { store: createObjectStore(config), publicUrl: config.publicUrl },
    );
    log(`clip ${clip.id} ${recipe.file}${recipe.expect ? ` (made to raise "${recipe.expect}")` : ''} queued`);
  } catch (error) {
    fs.rmSync(incoming, { force: true });
    if (!(error instanceof AppError)) throw error;
    log(`${path.basename(file)} refused as an operator would see it: ${error.message}`);
  }
}
