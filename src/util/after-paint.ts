/** Longest wait for a frame: a tab in the background draws none, and what waits must still go out. */
const FRAME_AT_MOST_MS = 100;

/**
 * Resolves once the browser has drawn the next frame (or after FRAME_AT_MOST_MS) and `thenMs` more have passed,
 * so that work which can wait (requests behind the screen, drawing what comes next) does not hold up showing what
 * the curator is waiting for.
 */
export function afterPaint(thenMs = 0): Promise<void> {
  const drawn = new Promise<void>((resolve) => {
    const fallback = setTimeout(resolve, FRAME_AT_MOST_MS);
    requestAnimationFrame(() =>
      setTimeout(() => {
        clearTimeout(fallback);
        resolve();
      }, 0),
    );
  });
  return thenMs > 0 ? drawn.then(() => new Promise((resolve) => setTimeout(resolve, thenMs))) : drawn;
}
