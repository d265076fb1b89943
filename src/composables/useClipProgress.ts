import { onBeforeUnmount, ref, watch, type Ref } from 'vue';
import type { ClipState } from '../../shared/clip-states';
import type { ClipProgress } from '../../shared/types/frames';
import { getProgress } from '../api/clip-media';

const POLL_MS = 1500;
const ACTIVE: ClipState[] = ['queued', 'processing'];

/** Follows a clip's processing by polling its progress while it is queued or processing; `finished` fires once. */
export function useClipProgress(clipId: Ref<number>, initialState: Ref<ClipState | undefined>, finished: () => void) {
  const progress = ref<ClipProgress | null>(null);
  let timer: ReturnType<typeof setTimeout> | undefined;

  async function poll(): Promise<void> {
    try {
      progress.value = await getProgress(clipId.value);
    } catch {
      // A missed poll is retried on the next tick; the page keeps what it showed.
    }
    if (progress.value && !ACTIVE.includes(progress.value.state)) {
      finished();
      return;
    }
    timer = setTimeout(poll, POLL_MS);
  }

  watch(
    [clipId, initialState],
    ([, state]) => {
      clearTimeout(timer);
      if (state && ACTIVE.includes(state)) void poll();
    },
    { immediate: true },
  );
  onBeforeUnmount(() => clearTimeout(timer));
  return progress;
}
