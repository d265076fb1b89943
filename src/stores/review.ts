import { defineStore } from 'pinia';
import { markRaw, ref } from 'vue';
import { fetchClipEvidence, warmPictures, type ClipEvidence } from '../components/review/clip-evidence';

/** A verdict just given that the curator can still take back. */
export interface UndoableVerdict {
  clipId: number;
  verdictId: number;
  clipName: string;
  /** "Accepted", "Rejected (Too dark)". */
  words: string;
  /** Until when the screen offers the undo (ms since the epoch). */
  offeredUntil: number;
}

/**
 * A curator's walk through the queue in this tab: the clips opened, in order (to step back), the ones passed
 * over without a decision (so "next" does not offer them again until the queue is reopened), the clip fetched
 * ahead of the one on screen, and the verdict that can still be undone.
 */
export const useReviewStore = defineStore('review', () => {
  const trail = ref<number[]>([]);
  const passed = ref(new Set<number>());
  const undoable = ref<UndoableVerdict | null>(null);
  /** One clip fetched ahead, with the pictures the browser is loading for it; not state the screens show. */
  let ahead: { clipId: number; evidence: Promise<ClipEvidence>; pictures: HTMLImageElement[] } | null = null;

  function visit(clipId: number): void {
    if (trail.value.at(-1) !== clipId) trail.value.push(clipId);
  }

  /** The clip opened before `clipId`, taken off the trail; null at the start. */
  function stepBack(clipId: number): number | null {
    while (trail.value.at(-1) === clipId) trail.value.pop();
    return trail.value.at(-1) ?? null;
  }

  function pass(clipId: number): void {
    passed.value.add(clipId);
  }

  /** Starts fetching a clip the curator is likely to open next; a failure is left for the real visit to report. */
  function fetchAhead(clipId: number): void {
    if (ahead?.clipId === clipId) return;
    const entry = { clipId, evidence: fetchClipEvidence(clipId), pictures: markRaw([] as HTMLImageElement[]) };
    entry.evidence.then(
      (evidence) => {
        if (ahead === entry) entry.pictures.push(...warmPictures(evidence));
      },
      () => {
        if (ahead === entry) ahead = null;
      },
    );
    ahead = entry;
  }

  /** The evidence of a clip: what was fetched ahead when it is that clip (used once), else fetched now. */
  function evidenceOf(clipId: number): Promise<ClipEvidence> {
    if (ahead?.clipId === clipId) {
      const { evidence } = ahead;
      ahead = null;
      return evidence.catch(() => fetchClipEvidence(clipId));
    }
    return fetchClipEvidence(clipId);
  }

  /** A fresh start, when the queue screen opens again. */
  function reset(): void {
    trail.value = [];
    passed.value = new Set();
    ahead = null;
  }

  return { trail, passed, undoable, visit, stepBack, pass, fetchAhead, evidenceOf, reset };
});
