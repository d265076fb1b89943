import { DEFAULT_FLAG_THRESHOLDS } from '../../../shared/flag-thresholds';
import { alignDuplicate } from '../../../shared/review/duplicate-steps';
import type { ComparedClip, DuplicateComparison } from '../../../shared/types/duplicate-comparison';
import { badRequest } from '../errors';
import { Clip, Frame, Project } from '../models';
import { existingClip } from './clip-media';

/**
 * A clip beside another whose frames it matches (the duplicate flag's `matchClipId`, or any clip a curator
 * names): both clips' frames in step and the dHash distance of each pair, judged by the project's threshold.
 */
export async function compareClips(clipId: number, otherId: number): Promise<DuplicateComparison> {
  if (clipId === otherId) throw badRequest('same_clip', `Clip ${clipId} cannot be compared with itself.`);
  const [clip, other] = await Promise.all([existingClip(clipId), existingClip(otherId)]);
  const [hashes, otherHashes, project] = await Promise.all([
    frameHashes(clipId),
    frameHashes(otherId),
    Project.findByPk(clip.projectId),
  ]);
  const thresholds = { ...DEFAULT_FLAG_THRESHOLDS, ...project?.flagThresholds };
  return {
    clip: compared(clip, hashes.length),
    other: compared(other, otherHashes.length),
    maxDistance: thresholds.duplicateHashDistance,
    ...alignDuplicate(hashes, otherHashes),
  };
}

async function frameHashes(clipId: number): Promise<(string | null)[]> {
  const frames = await Frame.findAll({ where: { clipId }, attributes: ['index', 'dhash'], order: [['index', 'ASC']] });
  return frames.map((frame) => frame.dhash ?? null);
}

function compared(clip: Clip, frameCount: number): ComparedClip {
  return { id: clip.id, originalName: clip.originalName, state: clip.state, frameCount };
}
