import { onBeforeUnmount, onMounted } from 'vue';
import { actionFor, REASON_KEYS, type ReviewAction } from '../components/review/review-keys';

/** True when a key press belongs to a field being typed in, not to the screen. */
function typingIn(target: EventTarget | null): boolean {
  const element = target as HTMLElement | null;
  if (!element) return false;
  return ['INPUT', 'TEXTAREA', 'SELECT'].includes(element.tagName) || element.isContentEditable;
}

/**
 * The review screen's keys on the whole window: `onAction` for a bound key, `onReason` with the reason's position
 * (0-based) for a digit. Keys with Ctrl, Alt or Meta stay the browser's; keys typed into a field stay the field's,
 * except Escape and Enter, which leave the field so the keys work again.
 */
export function useReviewKeys(onAction: (action: ReviewAction) => void, onReason: (position: number) => void) {
  function handle(event: KeyboardEvent): void {
    if (event.ctrlKey || event.altKey || event.metaKey || event.isComposing) return;
    if (typingIn(event.target)) {
      if (event.key === 'Escape' || event.key === 'Enter') {
        event.preventDefault();
        (event.target as HTMLElement).blur();
      }
      return;
    }
    const position = (REASON_KEYS as readonly string[]).indexOf(event.key);
    if (position >= 0) {
      event.preventDefault();
      onReason(position);
      return;
    }
    const action = actionFor(event.key);
    if (!action) return;
    event.preventDefault();
    onAction(action);
  }
  onMounted(() => window.addEventListener('keydown', handle));
  onBeforeUnmount(() => window.removeEventListener('keydown', handle));
}
