import type { MotionScale } from '../../../shared/motion/motion-scale';
import type { ClipDetail } from '../../../shared/types/clips';
import type { ClipFrame } from '../../../shared/types/frames';
import { clipMediaUrl, listFrames } from '../../api/clip-media';
import { getClip } from '../../api/clips';
import { getProject } from '../../api/projects';

/** Everything the review screen shows of one clip, fetched in as few round trips as the API allows. */
export interface ClipEvidence {
  detail: ClipDetail;
  frames: ClipFrame[];
  motionScale: MotionScale | null;
  deltas: number[];
}

/** Frames of the strip fetched ahead: the ones a 1440 px screen shows before any scrolling. */
const STRIP_AHEAD = 14;

export async function fetchClipEvidence(clipId: number): Promise<ClipEvidence> {
  const detail = await getClip(clipId);
  const [list, project] = await Promise.all([
    detail.frameCount ? listFrames(clipId) : Promise.resolve(null),
    getProject(detail.projectId),
  ]);
  return {
    detail,
    frames: list?.items ?? [],
    motionScale: list?.motionScale ?? null,
    deltas: project.settings.deltas,
  };
}

/**
 * The pictures the review screen shows first for a clip, fetched and decoded by the browser ahead of time: a
 * document reuses an image it has already loaded, so moving on to the clip shows them at once.
 */
export function warmPictures(evidence: ClipEvidence): HTMLImageElement[] {
  const { detail, frames, deltas } = evidence;
  const urls: string[] = [];
  if (detail.hasThumbnail) urls.push(clipMediaUrl.thumbnail(detail.id));
  if (frames.length > 0) {
    urls.push(clipMediaUrl.luma(detail.id, 0), clipMediaUrl.chroma(detail.id, 0));
    for (const delta of deltas) if (delta < frames.length) urls.push(clipMediaUrl.frame(detail.id, delta));
    for (const frame of frames.slice(0, STRIP_AHEAD)) {
      urls.push(clipMediaUrl.frame(detail.id, frame.index));
      if (frame.motion) urls.push(clipMediaUrl.motion(detail.id, frame.index));
    }
  }
  // Kept by the caller until the clip is shown, so the browser does not drop them half-loaded. Decoded now too:
  // otherwise the browser decodes them all while drawing the clip, and the curator waits for it.
  return [...new Set(urls)].map((url) => {
    const image = new Image();
    image.src = url;
    image.decode().catch(() => undefined);
    return image;
  });
}
