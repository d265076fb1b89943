/** Longest wait for a frame: a tab in the background draws none, and what waits must still go out. */
const FRAME_AT_MOST_MS = 100;

/**
 * Resolves once the page's own part of the next frame is done (its animation frame, then a task; or after
 * FRAME_AT_MOST_MS) and `thenMs` more have passed, so that work which can wait (requests behind the screen,
 * drawing what comes next) does not hold up showing what the curator is waiting for. The frame is not on screen
 * yet at that point: its raster and the display compositor's drawing follow (20–40 ms with software rendering,
 * traced), so work that would compete with them for the processor passes a `thenMs` beyond that.
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
