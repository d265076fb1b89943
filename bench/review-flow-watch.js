/* global window, document, requestAnimationFrame, getComputedStyle, Image, HTMLVideoElement */
// Runs in the review-flow benchmark's page before the page's own scripts (Playwright's addInitScript). It is plain
// JavaScript so that the code the page runs is exactly this text.
//
// `kfClipShown(id, name)` says whether the clip's page is fully shown: its title, its evidence opaque (the next
// clip's is drawn ahead, transparent, in the same place), every evidence panel (the chart drawn on its canvas, the
// motion scale's legend), the preview's poster loaded, and every picture in the panels loaded with pixels. Pictures the strip has scrolled out of sight load lazily, so only those in sight count. The
// claim is not waited for: the screen takes it behind the clip.
//
// `kfArmKey(id, name)` is called before a key is pressed. From the key event on, the clip is checked in every
// animation frame callback, that is just before the browser's style, layout and paint of that frame; once it holds,
// a task queued from there runs after the frame is painted. `kfKeyWait()` then gives the curator's wait, on the
// page's own clock, without the benchmark driver's round trips to the browser (see there).

window.kfClipShown = function (id, name) {
  const page = document.querySelector(`[data-test="review-clip"][data-clip-id="${id}"]`);
  if (page?.querySelector('h1')?.textContent?.trim() !== name) return false;
  // The clip's evidence as shown, not the next clip's drawn behind it.
  const screen = page.querySelector(`[data-test="review-evidence"][data-clip-id="${id}"]`);
  if (!screen || getComputedStyle(screen).opacity !== '1') return false;
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

// Key events as the browser itself timed them, from the event to the next frame on screen (Event Timing, the measure
// behind Interaction to Next Paint; durations in steps of 8 ms, and only those of 16 ms or more are reported).
window.kfKeyPaints = [];
new PerformanceObserver((list) => {
  for (const entry of list.getEntries()) if (entry.name === 'keydown') window.kfKeyPaints.push(entry);
}).observe({ type: 'event', durationThreshold: 16, buffered: true });

window.kfArmKey = function (id, name) {
  window.kfKeyAt = undefined;
  window.kfShownAt = undefined;
  window.kfInFirstFrame = undefined;
  let frames = 0;
  const check = () => {
    frames += 1;
    if (window.kfClipShown(id, name)) {
      window.kfInFirstFrame = frames === 1;
      window.kfNoteShownAfterPaint();
    } else requestAnimationFrame(check);
  };
  const onKey = (event) => {
    window.kfKeyAt = event.timeStamp;
    requestAnimationFrame(check);
  };
  window.addEventListener('keydown', onKey, { capture: true, once: true });
};

// The wait for the last key, measured twice. `byTimer`: to the task queued after the frame that showed the clip,
// which also counts the time that task waited to be run after the paint. `byBrowser`: when the clip was complete in
// the first frame after the key, the browser's own time from the key to that frame on screen (null when it was not
// complete then, or when the browser reported nothing: a wait under 16 ms). `wait` is `byBrowser` where there is one.
window.kfKeyWait = async function () {
  const byTimer = window.kfShownAt - window.kfKeyAt;
  const reported = () => window.kfKeyPaints.find((entry) => Math.abs(entry.startTime - window.kfKeyAt) < 1);
  for (let tries = 0; window.kfInFirstFrame && !reported() && tries < 10; tries += 1) {
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
  const byBrowser = window.kfInFirstFrame ? (reported()?.duration ?? null) : null;
  return { wait: byBrowser ?? byTimer, byTimer, byBrowser };
};
