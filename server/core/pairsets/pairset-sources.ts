import { literal, Op, type WhereOptions } from 'sequelize';
import type { MomentFrame } from '../../../shared/pairing/pairing-graph';
import type { PairsetDefinition } from '../../../shared/schemas/pairsets';
import { Clip, Frame, MotionField, Project } from '../models';
import type { DerivedFormat } from '../storage/paths';
import { jsonArrayHasAny } from '../db/dialect';

/** The field t→t+1 of a moment, with the estimator that made it. */
export interface SourceMotion {
  meanMagnitude: number;
  p95Magnitude: number;
  consistentShare: number;
  estimator: string;
}

export interface SourceFrame extends MomentFrame {
  timeS: number;
  meanLuma: number | null;
  contrast: number | null;
  sharpness: number | null;
  clippedShare: number | null;
  motion: SourceMotion | null;
}

/** An accepted clip a definition selects, with what pairing, pair.json and the statistics need of it. */
export interface SourceClip {
  id: number;
  projectId: number;
  projectName: string;
  site: string;
  durationS: number;
  /** How the clip's frames and fields are stored (storage/paths.ts). */
  derivedFormat: DerivedFormat;
  frames: SourceFrame[];
}

export type SourceSelection = Pick<PairsetDefinition, 'projectIds' | 'sites' | 'tags' | 'capturedFrom' | 'capturedTo'>;

/** SQLite binds at most 999 parameters in old builds; clip ids go in chunks well below that. */
const ID_CHUNK = 500;

/**
 * The accepted, unpurged clips a definition selects, by id, with their frames (signals, cuts) and forward motion
 * fields. Tags match when a clip has any of them; sites match exactly; the capture range is inclusive.
 */
export async function loadPairsetSources(selection: SourceSelection): Promise<SourceClip[]> {
  const clips = await Clip.findAll({
    where: clipWhere(selection),
    attributes: ['id', 'projectId', 'site', 'durationS', 'derivedFormat'],
    include: [{ model: Project, as: 'project', attributes: ['name'] }],
    order: [['id', 'ASC']],
  });
  const byId = new Map<number, SourceClip>(
    clips.map((clip) => [
      clip.id,
      {
        id: clip.id,
        projectId: clip.projectId,
        projectName: clip.project?.name ?? '',
        site: clip.site,
        durationS: clip.durationS,
        derivedFormat: clip.derivedFormat,
        frames: [],
      },
    ]),
  );
  const ids = [...byId.keys()];
  for (let start = 0; start < ids.length; start += ID_CHUNK) {
    const chunk = ids.slice(start, start + ID_CHUNK);
    const motion = await forwardFields(chunk);
    const frames = await Frame.findAll({
      where: { clipId: { [Op.in]: chunk } },
      attributes: ['clipId', 'index', 'timeS', 'cutBefore', 'meanLuma', 'contrast', 'sharpness', 'clippedShare'],
      order: [
        ['clipId', 'ASC'],
        ['index', 'ASC'],
      ],
    });
    for (const frame of frames) {
      byId.get(frame.clipId)!.frames.push({
        index: frame.index,
        timeS: frame.timeS,
        cutBefore: frame.cutBefore,
        meanLuma: frame.meanLuma,
        contrast: frame.contrast,
        sharpness: frame.sharpness,
        clippedShare: frame.clippedShare,
        motion: motion.get(`${frame.clipId}:${frame.index}`) ?? null,
      });
    }
  }
  return [...byId.values()];
}

function clipWhere(selection: SourceSelection): WhereOptions<Clip> {
  const and: WhereOptions<Clip>[] = [
    { state: 'accepted', purgedAt: null, projectId: { [Op.in]: selection.projectIds } },
  ];
  if (selection.sites?.length) and.push({ site: { [Op.in]: selection.sites } });
  if (selection.capturedFrom) and.push({ capturedAt: { [Op.gte]: new Date(selection.capturedFrom) } });
  if (selection.capturedTo) and.push({ capturedAt: { [Op.lte]: new Date(selection.capturedTo) } });
  if (selection.tags?.length) {
    const sequelize = Clip.sequelize!;
    const tags = selection.tags.map((tag) => sequelize.escape(tag)).join(', ');
    and.push(literal(jsonArrayHasAny(sequelize, '"Clip"."tags"', tags)));
  }
  return { [Op.and]: and };
}

/** Forward fields t→t+1 of the clips, keyed `clipId:t`. */
async function forwardFields(clipIds: number[]): Promise<Map<string, SourceMotion>> {
  const fields = await MotionField.findAll({
    where: { clipId: { [Op.in]: clipIds }, direction: 'forward' },
    attributes: ['clipId', 'fromIndex', 'toIndex', 'estimator', 'meanMagnitude', 'p95Magnitude', 'consistentShare'],
  });
  return new Map(
    fields
      .filter((field) => field.toIndex === field.fromIndex + 1)
      .map((field) => [
        `${field.clipId}:${field.fromIndex}`,
        {
          meanMagnitude: field.meanMagnitude,
          p95Magnitude: field.p95Magnitude,
          consistentShare: field.consistentShare,
          estimator: field.estimator,
        },
      ]),
  );
}
