/**
 * The review screen's keyboard, as data: the screen acts on it and the help overlay lists it, so the two never
 * disagree. Kinefold's own choice of keys: letters named after what they do, arrows for frames.
 */
export type ReviewAction =
  | 'accept'
  | 'reject'
  | 'undo'
  | 'next'
  | 'back'
  | 'frame-earlier'
  | 'frame-later'
  | 'frame-first'
  | 'frame-last'
  | 'overlay'
  | 'compare'
  | 'play'
  | 'comment'
  | 'queue'
  | 'help'
  | 'close';

export interface KeyBinding {
  action: ReviewAction;
  /** KeyboardEvent.key values (letters in lower case). */
  keys: string[];
  /** How the help overlay shows the keys. */
  shown: string;
  words: string;
}

export const REVIEW_KEYS: readonly KeyBinding[] = [
  { action: 'accept', keys: ['a'], shown: 'A', words: 'Accept this clip, then open the next one' },
  { action: 'reject', keys: ['r'], shown: 'R', words: 'Reject: show the numbered reasons' },
  { action: 'undo', keys: ['u'], shown: 'U', words: 'Undo the verdict just given, while the screen offers it' },
  { action: 'next', keys: ['n'], shown: 'N', words: 'Next clip in the queue, leaving this one undecided' },
  { action: 'back', keys: ['b'], shown: 'B', words: 'Back to the clip opened before' },
  { action: 'frame-earlier', keys: ['ArrowLeft'], shown: '←', words: 'One frame earlier' },
  { action: 'frame-later', keys: ['ArrowRight'], shown: '→', words: 'One frame later' },
  { action: 'frame-first', keys: ['Home'], shown: 'Home', words: 'First frame' },
  { action: 'frame-last', keys: ['End'], shown: 'End', words: 'Last frame' },
  { action: 'overlay', keys: ['m'], shown: 'M', words: 'Motion picture over the frame: on or off' },
  { action: 'compare', keys: ['d'], shown: 'D', words: 'A flagged duplicate beside the clip it matches: show or hide' },
  { action: 'play', keys: ['v'], shown: 'V', words: 'Play or pause the preview video' },
  { action: 'comment', keys: ['c'], shown: 'C', words: 'Write a comment; Enter brings the keys back' },
  { action: 'queue', keys: ['q'], shown: 'Q', words: 'Back to the queue' },
  { action: 'help', keys: ['?'], shown: '?', words: 'Show or hide this list' },
  { action: 'close', keys: ['Escape'], shown: 'Esc', words: 'Close the reasons, the comparison or this list' },
];

/** With the reasons shown, 1–9 and 0 pick the first ten reasons and reject at once. */
export const REASON_KEYS = ['1', '2', '3', '4', '5', '6', '7', '8', '9', '0'] as const;

export function actionFor(key: string): ReviewAction | null {
  const pressed = key.length === 1 ? key.toLowerCase() : key;
  return REVIEW_KEYS.find((binding) => binding.keys.includes(pressed))?.action ?? null;
}
