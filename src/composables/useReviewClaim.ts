import { computed, onBeforeUnmount, onMounted, ref, watch, type Ref } from 'vue';
import { CLAIM_MINUTES } from '../../shared/review/rules';
import type { ClipClaim } from '../../shared/types/review';
import { ApiError } from '../api/http';
import { claimClip, releaseClaim } from '../api/review';

const CHECK_EVERY_MS = 60_000;
/** Renew once less than this is left, so a claim never lapses between two checks. */
const RENEW_WHEN_LEFT_MS = 10 * 60_000;
const MINUTE_MS = 60_000;
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
  const mine = computed(() => claim.value !== null);
  let lastActivity = Date.now();
  let timer: ReturnType<typeof setInterval> | undefined;

  async function take(): Promise<void> {
    const id = clipId.value;
    try {
      const taken = await claimClip(id);
      if (id !== clipId.value) return;
      claim.value = taken;
      heldBy.value = null;
      problem.value = '';
    } catch (error) {
      if (id !== clipId.value) return;
      claim.value = null;
      const details = error instanceof ApiError ? (error.details as { claim?: ClipClaim } | undefined) : undefined;
      if (error instanceof ApiError && error.code === 'claimed' && details?.claim) heldBy.value = details.claim;
      else problem.value = (error as Error).message;
    }
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

  /** After a verdict the server has ended the claim already. */
  function forget(): void {
    claim.value = null;
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
    await take();
  });

  onMounted(() => {
    void take();
    timer = setInterval(check, CHECK_EVERY_MS);
    for (const kind of ACTIVITY) window.addEventListener(kind, noteActivity, { passive: true });
  });
  onBeforeUnmount(() => {
    clearInterval(timer);
    for (const kind of ACTIVITY) window.removeEventListener(kind, noteActivity);
    void release(clipId.value);
  });

  return { claim, heldBy, problem, mine, take, takeOver, forget };
}
