import { ref, watch, type Ref } from 'vue';
import type { SimilarClips } from '../../shared/types/diversity';
import { similarClips } from '../api/diversity';

/** The clips of the same cluster as the given one, nearest first; reloaded when the clip changes. */
export function useSimilarClips(clipId: Ref<number | null>) {
  const similar = ref<SimilarClips | null>(null);
  const error = ref('');
  watch(
    clipId,
    async (id) => {
      similar.value = null;
      error.value = '';
      if (id === null) return;
      try {
        const answer = await similarClips(id);
        if (clipId.value === id) similar.value = answer;
      } catch (failure) {
        if (clipId.value === id) error.value = (failure as Error).message;
      }
    },
    { immediate: true },
  );
  return { similar, error };
}
