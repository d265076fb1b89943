import { computed, onBeforeUnmount, onMounted, ref, watch, type Ref } from 'vue';
import { CLAIM_MINUTES } from '../../shared/review/rules';
import type { ClipClaim } from '../../shared/types/review';
import { ApiError } from '../api/http';
import { claimClip, releaseClaim } from '../api/review';
import { afterPaint } from '../util/after-paint';

const CHECK_EVERY_MS = 60_000;
/** Renew once less than this is left, so a claim never lapses between two checks. */
const RENEW_WHEN_LEFT_MS = 10 * 60_000;
const MINUTE_MS = 60_000;
/** The claim waits this long once the clip is drawn, so its request does not compete with showing the clip. */
const CLAIM_AFTER_MS = 250;
/** What counts as working on the clip. */
const ACTIVITY = ['keydown', 'pointerdown', 'scroll'] as const;

/**
 * The claim on the clip being reviewed: taken when the clip opens, renewed while the curator is active on the
 * screen (a key, a click or a scroll within the claim's length), let go when they leave. An idle tab stops
 * renewing, so its claim lapses by itself. When someone else holds the clip, it says who and tries again now and
 * then, so the clip frees up on screen when their claim ends.
 */
export function useReviewClaim(clipId: Ref<number>) {
  const claim = ref<ClipClaim | null>(null);
  const heldBy = ref<ClipClaim | null>(null);
  const problem = ref('');
  /** The claim on the clip on screen is being taken: a decision may be given, and is sent once it is held. */
  const claiming = ref(false);
  const mine = computed(() => claim.value !== null);
  let lastActivity = Date.now();
  let timer: ReturnType<typeof setInterval> | undefined;
  /** The latest attempt: which clip, its answer, and whether a verdict took it over (so it is not let go). */
  let attempt: { clipId: number; taken: Promise<ClipClaim>; handedOver: boolean } | null = null;
  /** The screen has closed: a claim answered after that is let go. */
  let left = false;

  function take(): Promise<void> {
    const id = clipId.value;
    // Asked for once the clip has been shown: a decision given meanwhile waits for this answer all the same.
    const entry = { clipId: id, taken: afterPaint(CLAIM_AFTER_MS).then(() => claimClip(id)), handedOver: false };
    attempt = entry;
    claiming.value = claim.value === null;
    return entry.taken.then(
      (taken) => {
        if (id !== clipId.value || left) {
          // Left before the answer came, without deciding: the claim is let go, as leaving does.
          if (!entry.handedOver) void releaseClaim(id).catch(() => undefined);
          return;
        }
        if (attempt === entry) claiming.value = false;
        claim.value = taken;
        heldBy.value = null;
        problem.value = '';
      },
      (error: unknown) => {
        if (id !== clipId.value) return;
        if (attempt === entry) claiming.value = false;
        claim.value = null;
        const details = error instanceof ApiError ? (error.details as { claim?: ClipClaim } | undefined) : undefined;
        if (error instanceof ApiError && error.code === 'claimed' && details?.claim) heldBy.value = details.claim;
        else problem.value = (error as Error).message;
      },
    );
  }

  /**
   * A verdict is given on the clip on screen: resolves once its claim is held (at once when it is), rejects with
   * the reason when it cannot be. The verdict ends the claim on the server, so the screen forgets it.
   */
  function handOver(): Promise<unknown> {
    const id = clipId.value;
    const held = claim.value;
    claim.value = null;
    claiming.value = false;
    // A renewal still on its way must not let go of the claim the verdict needs.
    if (attempt?.clipId === id) attempt.handedOver = true;
    if (held?.clipId === id) return Promise.resolve(held);
    if (attempt?.clipId !== id) return Promise.reject(new Error(`Clip ${id} is not claimed by you.`));
    return attempt.taken;
  }

  async function release(id: number): Promise<void> {
    if (!claim.value || claim.value.clipId !== id) return;
    claim.value = null;
    await releaseClaim(id).catch(() => undefined);
  }

  /** An admin ends someone else's claim, then takes the clip. */
  async function takeOver(): Promise<void> {
    try {
      await releaseClaim(clipId.value);
      await take();
    } catch (error) {
      problem.value = (error as Error).message;
    }
  }

  function check(): void {
    const now = Date.now();
    if (claim.value) {
      const left = new Date(claim.value.expiresAt).getTime() - now;
      if (left < RENEW_WHEN_LEFT_MS && now - lastActivity < CLAIM_MINUTES * MINUTE_MS) void take();
    } else if (heldBy.value) {
      void take();
    }
  }

  const noteActivity = () => {
    lastActivity = Date.now();
  };

  watch(clipId, async (_next, previous) => {
    if (previous !== undefined) await release(previous);
    heldBy.value = null;
    problem.value = '';
    claim.value = null;
    await take();
  });

  onMounted(() => {
    void take();
    timer = setInterval(check, CHECK_EVERY_MS);
    for (const kind of ACTIVITY) window.addEventListener(kind, noteActivity, { passive: true });
  });
  onBeforeUnmount(() => {
    left = true;
    clearInterval(timer);
    for (const kind of ACTIVITY) window.removeEventListener(kind, noteActivity);
    void release(clipId.value);
  });

  return { claim, heldBy, problem, claiming, mine, take, takeOver, handOver };
}
