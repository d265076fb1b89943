import type { ClipFrameList, ClipProgress } from '../../shared/types/frames';
import { http } from './http';

export const listFrames = (clipId: number) => http.get<ClipFrameList>(`/clips/${clipId}/frames`);
export const getProgress = (clipId: number) => http.get<ClipProgress>(`/clips/${clipId}/progress`);

/** Picture and video addresses, served by the API (images and the preview are fetched by the browser directly). */
export const clipMediaUrl = {
  frame: (clipId: number, index: number) => `/api/clips/${clipId}/frames/${index}`,
  luma: (clipId: number, index: number) => `/api/clips/${clipId}/views/${index}/luma`,
  chroma: (clipId: number, index: number) => `/api/clips/${clipId}/views/${index}/chroma`,
  /** Colour picture of the forward motion field from frame `index` to `index` + 1; the field itself as .flo. */
  motion: (clipId: number, index: number) => `/api/clips/${clipId}/motion/${index}`,
  motionFlo: (clipId: number, index: number) => `/api/clips/${clipId}/motion/${index}/flo`,
  preview: (clipId: number) => `/api/clips/${clipId}/preview`,
  thumbnail: (clipId: number) => `/api/clips/${clipId}/thumbnail`,
};

/** Admins: process the clip again with its project's current settings (verdict kept). */
export const reprocessClip = (clipId: number) => http.post<void>(`/clips/${clipId}/reprocess`);
