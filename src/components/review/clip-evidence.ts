import type { MotionScale } from '../../../shared/motion/motion-scale';
import type { ClipDetail } from '../../../shared/types/clips';
import type { ClipFrame } from '../../../shared/types/frames';
import { clipMediaUrl, listFrames } from '../../api/clip-media';
import { getClip } from '../../api/clips';
import { getProject } from '../../api/projects';
import { stripPictureHeightHere, type StripHeight } from '../clips/strip-pictures';

/** Everything the review screen shows of one clip, fetched in as few round trips as the API allows. */
export interface ClipEvidence {
  detail: ClipDetail;
  frames: ClipFrame[];
  motionScale: MotionScale | null;
  deltas: number[];
}

/** The clip a duplicate flag says this one matches; null when no flag names one. */
export function duplicateOf(detail: ClipDetail): number | null {
  return detail.flagDetails.find((flag) => flag.matchClipId)?.matchClipId ?? null;
}

/** Frames of the strip fetched ahead: the ones a 1440 px screen shows before any scrolling. */
const STRIP_AHEAD = 14;
/** The review screen draws its frame strip this high, so that the screen fits 1440 × 900. */
export const REVIEW_STRIP_HEIGHT: StripHeight = 34;

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
    // Frame 0 whole, as the neighbours and the views show it, with its neighbours, views and motion picture.
    urls.push(clipMediaUrl.frame(detail.id, 0), clipMediaUrl.luma(detail.id, 0), clipMediaUrl.chroma(detail.id, 0));
    if (frames[0]!.motion) urls.push(clipMediaUrl.motion(detail.id, 0));
    for (const delta of deltas) if (delta < frames.length) urls.push(clipMediaUrl.frame(detail.id, delta));
    // The strip's pictures at the height the strip asks for on this screen (ClipFrameStrip.vue).
    const height = stripPictureHeightHere(REVIEW_STRIP_HEIGHT);
    for (const frame of frames.slice(0, STRIP_AHEAD)) {
      urls.push(clipMediaUrl.frame(detail.id, frame.index, height));
      if (frame.motion) urls.push(clipMediaUrl.motion(detail.id, frame.index, height));
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
