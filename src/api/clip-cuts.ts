import type { CutMarkValue, ClipCutList, FrameCut } from '../../shared/types/cuts';
import { http } from './http';

export const listClipCuts = (clipId: number) => http.get<ClipCutList>(`/clips/${clipId}/cuts`);
/** Curators: a cut before frame `index` (`cut`), or none there (`none`), whatever the detector found. */
export const markCut = (clipId: number, index: number, value: CutMarkValue) =>
  http.put<FrameCut>(`/clips/${clipId}/cuts/${index}`, { value });
/** Curators: the detector decides again before frame `index`. */
export const clearCutMark = (clipId: number, index: number) => http.delete<FrameCut>(`/clips/${clipId}/cuts/${index}`);
