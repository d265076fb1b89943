import type { PictureHeight } from '../../shared/schemas/clip-media';
import type { ClipFrameList, ClipProgress } from '../../shared/types/frames';
import { http } from './http';

export const listFrames = (clipId: number) => http.get<ClipFrameList>(`/clips/${clipId}/frames`);
export const getProgress = (clipId: number) => http.get<ClipProgress>(`/clips/${clipId}/progress`);

/** Picture and video addresses, served by the API (images and the preview are fetched by the browser directly). */
export const clipMediaUrl = {
  /** With `height`, shrunk to that many pixels high (the frame strip's pictures). */
  frame: (clipId: number, index: number, height?: PictureHeight) =>
    `/api/clips/${clipId}/frames/${index}${heightQuery(height)}`,
  luma: (clipId: number, index: number) => `/api/clips/${clipId}/views/${index}/luma`,
  chroma: (clipId: number, index: number) => `/api/clips/${clipId}/views/${index}/chroma`,
  /** Colour picture of the forward motion field from frame `index` to `index` + 1; the field itself as .flo. */
  motion: (clipId: number, index: number, height?: PictureHeight) =>
    `/api/clips/${clipId}/motion/${index}${heightQuery(height)}`,
  motionFlo: (clipId: number, index: number) => `/api/clips/${clipId}/motion/${index}/flo`,
  preview: (clipId: number) => `/api/clips/${clipId}/preview`,
  thumbnail: (clipId: number) => `/api/clips/${clipId}/thumbnail`,
};

function heightQuery(height: PictureHeight | undefined): string {
  return height ? `?height=${height}` : '';
}

/** Admins: process the clip again with its project's current settings (verdict kept). */
export const reprocessClip = (clipId: number) => http.post<void>(`/clips/${clipId}/reprocess`);
