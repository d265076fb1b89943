import { defineStore } from 'pinia';
import { ref } from 'vue';

/**
 * A curator's walk through the queue in this tab: the clips opened, in order (to step back), and the ones passed
 * over without a decision (so "next" does not offer them again until the queue is reopened).
 */
export const useReviewStore = defineStore('review', () => {
  const trail = ref<number[]>([]);
  const passed = ref(new Set<number>());

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

  /** A fresh start, when the queue screen opens again. */
  function reset(): void {
    trail.value = [];
    passed.value = new Set();
  }

  return { trail, passed, visit, stepBack, pass, reset };
});
