import { randomBytes } from 'node:crypto';
import { Clip } from '../../server/core/models';
import type { FlagName } from '../../shared/flag-thresholds';
import type { ClipFlagDetail } from '../../shared/types/clips';

export interface ReviewClipFields {
  projectId: number;
  uploaderId: number;
  originalName?: string;
  flags?: FlagName[];
  site?: string;
  capturedAt?: Date | null;
  state?: Clip['state'];
  durationS?: number;
  medianSharpness?: number | null;
  meanLuma?: number | null;
  meanMotion?: number | null;
  consistentShare?: number | null;
  cutCount?: number | null;
  usablePairs?: number | null;
  createdAt?: Date;
}

let serial = 0;

/**
 * A clip row as the pipeline leaves it after the flags stage (`awaiting_review` with signals and flags), written
 * directly so review tests need no footage. Each raised flag gets a detail line like the flags stage writes.
 */
export async function insertReviewClip(fields: ReviewClipFields): Promise<Clip> {
  const clip = await Clip.create(reviewClipRow(fields));
  if (fields.createdAt) {
    // Sequelize never writes createdAt on update, so the upload time is set with SQL.
    await Clip.sequelize!.query('UPDATE clips SET "createdAt" = :at WHERE id = :id', {
      replacements: { at: fields.createdAt, id: clip.id },
    });
  }
  return clip;
}

/** The attributes insertReviewClip writes, for Clip.bulkCreate when a test needs many rows. */
export function reviewClipRow(fields: ReviewClipFields) {
  serial += 1;
  const flags = fields.flags ?? [];
  const flagDetails: ClipFlagDetail[] = flags.map((flag) => ({
    flag,
    measure: 'test measure',
    value: 1,
    threshold: 2,
    message: `${flag} for the test`,
  }));
  return {
    projectId: fields.projectId,
    uploaderId: fields.uploaderId,
    originalName: fields.originalName ?? `clip-${serial}.mp4`,
    sizeBytes: 1000,
    storedBytes: 1000,
    sha256: randomBytes(32).toString('hex'),
    sourceExt: 'mp4',
    state: fields.state ?? 'awaiting_review',
    container: 'mov,mp4,m4a,3gp,3g2,mj2',
    codec: 'h264',
    durationS: fields.durationS ?? 10,
    fps: 25,
    width: 320,
    height: 240,
    rotation: 0,
    site: fields.site ?? '',
    rig: '',
    capturedAt: fields.capturedAt ?? null,
    tags: [],
    notes: '',
    flags,
    flagDetails,
    frameCount: 50,
    cutCount: fields.cutCount ?? 0,
    medianSharpness: fields.medianSharpness ?? 150,
    meanLuma: fields.meanLuma ?? 120,
    meanMotion: fields.meanMotion ?? null,
    consistentShare: fields.consistentShare ?? null,
    usablePairs: fields.usablePairs ?? 49,
  } satisfies Parameters<typeof Clip.create>[0];
}
