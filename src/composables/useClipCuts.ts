import { computed, ref, watch, type Ref } from 'vue';
import type { CutMarkValue, FrameCut } from '../../shared/types/cuts';
import { clearCutMark, listClipCuts, markCut } from '../api/clip-cuts';

/**
 * A clip's cuts with their evidence (frames where a cut was found or marked, or evidence fired), and a curator's
 * marks. `cutAt` says what counts before a frame once this page changed it, so the frame strip follows at once.
 */
export function useClipCuts(clipId: Ref<number>) {
  const items = ref<FrameCut[]>([]);
  const error = ref<string | null>(null);
  const busy = ref(false);
  const byIndex = computed(() => new Map(items.value.map((item) => [item.index, item])));

  async function load(): Promise<void> {
    try {
      items.value = (await listClipCuts(clipId.value)).items;
      error.value = null;
    } catch (caught) {
      error.value = caught instanceof Error ? caught.message : String(caught);
    }
  }

  async function change(index: number, value: CutMarkValue | null): Promise<void> {
    busy.value = true;
    try {
      const changed =
        value === null ? await clearCutMark(clipId.value, index) : await markCut(clipId.value, index, value);
      items.value = [...items.value.filter((item) => item.index !== index), changed].sort((a, b) => a.index - b.index);
      error.value = null;
    } catch (caught) {
      error.value = caught instanceof Error ? caught.message : String(caught);
    } finally {
      busy.value = false;
    }
  }

  watch(clipId, () => void load(), { immediate: true });
  return { items, byIndex, error, busy, change };
}
