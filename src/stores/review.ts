import { defineStore } from 'pinia';
import { markRaw, ref, toRaw } from 'vue';
import { UNDO_OFFER_SECONDS } from '../../shared/review/rules';
import type { VerdictBody } from '../../shared/schemas/review';
import { decideClip, releaseClaim } from '../api/review';
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

/** A verdict given on the screen: what is sent, and how the screen names it. */
export interface GivenVerdict {
  clipId: number;
  clipName: string;
  /** "Accept", "Reject (Too dark)". */
  words: string;
  body: VerdictBody;
}

/** A verdict the server did not record; the clip stays in the queue until the curator decides it again. */
export interface RefusedVerdict extends GivenVerdict {
  message: string;
}

/** Clips fetched ahead at most: the next one and the one after it, with one to spare for a step back. */
const AHEAD_AT_MOST = 3;

/**
 * A curator's walk through the queue in this tab: the clips opened, in order (to step back), the ones passed
 * over without a decision (so "next" does not offer them again until the queue is reopened), the clips fetched
 * ahead of the one on screen, the verdicts on their way to the server or refused by it, and the verdict that can
 * still be undone. The screen moves on as soon as a verdict is given; the verdict is sent from here, behind it.
 */
export const useReviewStore = defineStore('review', () => {
  const trail = ref<number[]>([]);
  const passed = ref(new Set<number>());
  const undoable = ref<UndoableVerdict | null>(null);
  /** Verdicts given and not yet answered, in the order given. */
  const sending = ref<GivenVerdict[]>([]);
  const refused = ref<RefusedVerdict[]>([]);
  /** Clips given a verdict in this walk, so "next" does not offer them while their verdict is on its way. */
  const decided = new Set<number>();
  let settling: Promise<unknown> = Promise.resolve();
  /** Clips fetched ahead, with the pictures the browser is loading for them; not state the screens show. */
  const ahead = new Map<number, { evidence: Promise<ClipEvidence>; pictures: HTMLImageElement[] }>();
  /** "Next" looked up ahead, by the clip it follows and the queue's filter and order. */
  const nextLookups = new Map<string, Promise<number | null>>();
  // A verdict is sent a moment after it is given, behind the next clip: closing or reloading the tab meanwhile
  // would lose it, so the browser asks the curator first.
  window.addEventListener('beforeunload', (event) => {
    if (sending.value.length > 0) event.preventDefault();
  });

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

  /** Whether "next" may offer the clip: not passed over, and no verdict given on it in this walk. */
  function offerable(clipId: number): boolean {
    return !passed.value.has(clipId) && !decided.has(clipId);
  }

  /** Starts fetching a clip the curator is likely to open; a failure is left for the real visit to report. */
  function fetchAhead(clipId: number): void {
    if (ahead.has(clipId)) return;
    const entry = { evidence: fetchClipEvidence(clipId), pictures: markRaw([] as HTMLImageElement[]) };
    entry.evidence.then(
      (evidence) => {
        if (ahead.get(clipId) === entry) entry.pictures.push(...warmPictures(evidence));
      },
      () => {
        if (ahead.get(clipId) === entry) ahead.delete(clipId);
      },
    );
    ahead.set(clipId, entry);
    // The oldest entries go first: the curator has walked past them.
    for (const old of ahead.keys()) if (ahead.size > AHEAD_AT_MOST) ahead.delete(old);
  }

  /** The evidence being fetched ahead for a clip, left for evidenceOf; null when none is. */
  function aheadOf(clipId: number): Promise<ClipEvidence> | null {
    return ahead.get(clipId)?.evidence ?? null;
  }

  /** The evidence of a clip: what was fetched ahead when there is some (used once), else fetched now. */
  function evidenceOf(clipId: number): Promise<ClipEvidence> {
    const entry = ahead.get(clipId);
    if (entry) {
      ahead.delete(clipId);
      return entry.evidence.catch(() => fetchClipEvidence(clipId));
    }
    return fetchClipEvidence(clipId);
  }

  /**
   * The clip after `clipId` under the queue's filter and order (`flow` names them): the lookup made ahead when
   * there is one (used once), else `lookup` now.
   */
  function nextAfter(clipId: number, flow: string, lookup: (id: number) => Promise<number | null>) {
    const key = `${clipId} ${flow}`;
    const known = nextLookups.get(key);
    nextLookups.delete(key);
    return known ?? lookup(clipId);
  }

  /** Looks up the clip after `clipId` ahead of time, for nextAfter. */
  function lookAhead(clipId: number, flow: string, lookup: (id: number) => Promise<number | null>) {
    const key = `${clipId} ${flow}`;
    if (!nextLookups.has(key)) nextLookups.set(key, lookup(clipId));
    return nextLookups.get(key)!;
  }

  /**
   * Sends a verdict behind the screen, once `claimed` says the clip is held (it rejects with the reason when not).
   * Recorded, it becomes the verdict to undo; refused, it is listed with the server's reason, the clip goes back
   * to the queue (claim let go, no longer passed over) and no later verdict hides it.
   */
  function give(verdict: GivenVerdict, claimed: Promise<unknown>): void {
    sending.value.push(verdict);
    decided.add(verdict.clipId);
    // One after the other, so the verdict to undo is always the last one given.
    const sent = Promise.all([settling, claimed])
      .then(() => decideClip(verdict.clipId, verdict.body))
      .then(
        (clip) => {
          undoable.value = {
            clipId: clip.id,
            verdictId: clip.verdict!.id,
            clipName: clip.originalName,
            words:
              verdict.body.decision === 'accept'
                ? 'Accepted'
                : `Rejected (${clip.verdict?.reasonLabel ?? verdict.body.reason})`,
            offeredUntil: Date.now() + UNDO_OFFER_SECONDS * 1000,
          };
        },
        async (error: unknown) => {
          refused.value.push({ ...verdict, message: (error as Error).message });
          decided.delete(verdict.clipId);
          passed.value.delete(verdict.clipId);
          await releaseClaim(verdict.clipId).catch(() => undefined);
        },
      )
      .finally(() => {
        sending.value = sending.value.filter((entry) => toRaw(entry) !== verdict);
      });
    settling = Promise.all([settling, sent]);
  }

  /** Resolves once every verdict given so far has been recorded or refused. */
  async function settled(): Promise<void> {
    let waited: Promise<unknown>;
    do {
      waited = settling;
      await waited;
    } while (waited !== settling);
  }

  /** The curator has seen a refusal (and reopened the clip, or let it be). */
  function dismissRefusal(clipId: number): void {
    refused.value = refused.value.filter((entry) => entry.clipId !== clipId);
  }

  /** An undone verdict puts its clip back in the walk. */
  function undone(clipId: number): void {
    decided.delete(clipId);
    undoable.value = null;
  }

  /** A fresh start, when the queue screen opens again; refusals stay until the curator has seen them. */
  function reset(): void {
    trail.value = [];
    passed.value = new Set();
    ahead.clear();
    nextLookups.clear();
  }

  return {
    trail,
    passed,
    undoable,
    sending,
    refused,
    visit,
    stepBack,
    pass,
    offerable,
    fetchAhead,
    aheadOf,
    evidenceOf,
    nextAfter,
    lookAhead,
    give,
    settled,
    dismissRefusal,
    undone,
    reset,
  };
});
