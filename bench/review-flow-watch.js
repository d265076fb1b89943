/* global window, document, requestAnimationFrame, Image, HTMLVideoElement */
// Runs in the review-flow benchmark's page before the page's own scripts (Playwright's addInitScript). It is plain
// JavaScript so that the code the page runs is exactly this text.
//
// `kfClipShown(id, name)` says whether the clip's page is fully shown: its title, every evidence panel (the chart
// drawn on its canvas, the motion scale's legend), the preview's poster loaded, and every picture in the panels
// loaded with pixels. Pictures the strip has scrolled out of sight load lazily, so only those in sight count. The
// claim is not waited for: the screen takes it behind the clip.
//
// `kfArmKey(id, name)` is called before a key is pressed. From the key event on, the clip is checked in every
// animation frame callback, that is just before the browser's style, layout and paint of that frame; once it holds,
// a task queued from there runs after the frame is painted, and its time is when the screen showed the clip.
// `kfShownAt - kfKeyAt` is then the curator's wait, on the page's own clock, without the benchmark driver's round
// trips to the browser.

window.kfClipShown = function (id, name) {
  const screen = document.querySelector(`[data-test="review-clip"][data-clip-id="${id}"]`);
  if (screen?.querySelector('h1')?.textContent?.trim() !== name) return false;
  const panels = ['preview', 'flags', 'signals', 'neighbours', 'views', 'frames'];
  if (!panels.every((panel) => screen.querySelector(`[data-panel="${panel}"]`))) return false;
  if (!screen.querySelector('[data-panel="signals"] canvas')) return false;
  if (!screen.querySelector('[data-test="motion-scale"]')) return false;
  const preview = screen.querySelector('[data-test="review-preview"]');
  const poster = preview instanceof HTMLVideoElement ? preview.poster : '';
  if (!poster) return false;
  // A picture the document has loaded is complete at once when asked for again; one still loading is not.
  const probe = new Image();
  probe.src = poster;
  if (!probe.complete || probe.naturalWidth === 0) return false;
  const strip = screen.querySelector('[data-test="frame-strip"]').getBoundingClientRect();
  const pictures = [...screen.querySelectorAll('[data-panel] img')].filter((image) => {
    const box = image.getBoundingClientRect();
    return !image.closest('[data-test="frame-strip"]') || box.left < strip.right;
  });
  return pictures.length > 0 && pictures.every((image) => image.complete && image.naturalWidth > 0);
};

window.kfNoteShownAfterPaint = function () {
  setTimeout(() => (window.kfShownAt = performance.now()), 0);
};

window.kfArmKey = function (id, name) {
  window.kfKeyAt = undefined;
  window.kfShownAt = undefined;
  const check = () => {
    if (window.kfClipShown(id, name)) window.kfNoteShownAfterPaint();
    else requestAnimationFrame(check);
  };
  const onKey = (event) => {
    window.kfKeyAt = event.timeStamp;
    requestAnimationFrame(check);
  };
  window.addEventListener('keydown', onKey, { capture: true, once: true });
};
