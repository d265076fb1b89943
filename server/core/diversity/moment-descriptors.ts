import { Op } from 'sequelize';
import { DESCRIPTOR_DIMS } from '../../../shared/diversity/descriptor-layout';
import type { MomentRef } from '../../../shared/types/diversity';
import { Clip, MomentDescriptor } from '../models';

/** Clips whose moments a clustering takes: processed, not rejected, footage still there. */
const CLUSTERED_STATES = ['awaiting_review', 'accepted'];
const CLIP_CHUNK = 200;

export interface LoadedMoments {
  refs: MomentRef[];
  /** refs.length × DESCRIPTOR_DIMS, row-major. */
  points: Float64Array;
}

/** The ids of the clips a clustering of these projects covers, ascending. */
export async function clusteredClipIds(projectIds: readonly number[]): Promise<number[]> {
  const clips = await Clip.findAll({
    where: { projectId: { [Op.in]: projectIds }, state: { [Op.in]: CLUSTERED_STATES }, purgedAt: null },
    attributes: ['id'],
    order: [['id', 'ASC']],
  });
  return clips.map((clip) => clip.id);
}

/** Every stored moment descriptor of the clips, clip by clip in id order, frames ascending. */
export async function loadMomentDescriptors(clipIds: readonly number[]): Promise<LoadedMoments> {
  const refs: MomentRef[] = [];
  const rows: MomentDescriptor[] = [];
  for (let start = 0; start < clipIds.length; start += CLIP_CHUNK) {
    const chunk = clipIds.slice(start, start + CLIP_CHUNK);
    rows.push(
      ...(await MomentDescriptor.findAll({ where: { clipId: { [Op.in]: chunk } }, order: [['clipId', 'ASC']] })),
    );
  }
  const total = rows.reduce((sum, row) => sum + row.frameCount, 0);
  const points = new Float64Array(total * DESCRIPTOR_DIMS);
  for (const row of rows) {
    for (let t = 0; t < row.frameCount; t += 1) {
      row.momentInto(t, points.subarray(refs.length * DESCRIPTOR_DIMS, (refs.length + 1) * DESCRIPTOR_DIMS));
      refs.push({ clipId: row.clipId, frame: t });
    }
  }
  return { refs, points };
}

/** A clip's descriptor: the mean of its moments', standardised with `scaling`; null without descriptors. */
export function clipDescriptor(row: MomentDescriptor, scaling: { mean: number[]; sd: number[] }): Float64Array | null {
  if (row.frameCount === 0) return null;
  const sum = new Float64Array(DESCRIPTOR_DIMS);
  const moment = new Float64Array(DESCRIPTOR_DIMS);
  for (let t = 0; t < row.frameCount; t += 1) {
    row.momentInto(t, moment);
    for (let j = 0; j < DESCRIPTOR_DIMS; j += 1) sum[j] += moment[j]!;
  }
  for (let j = 0; j < DESCRIPTOR_DIMS; j += 1) sum[j] = (sum[j]! / row.frameCount - scaling.mean[j]!) / scaling.sd[j]!;
  return sum;
}
