// Loads OpenCV.js (@techstark/opencv-js) for cross-checks against the reference implementation.
// The module object has a `then` method, so it must never be awaited or returned from an async function
// directly: we wait for `onRuntimeInitialized` and hand it back inside a wrapper object.
import { createRequire } from 'node:module';

export type OpenCv = typeof import('@techstark/opencv-js');

interface EmscriptenModule {
  Mat?: unknown;
  onRuntimeInitialized?: () => void;
}

export async function loadOpenCv(): Promise<{ cv: OpenCv }> {
  const require = createRequire(import.meta.url);
  const cv = require('@techstark/opencv-js') as OpenCv & EmscriptenModule;
  await new Promise<void>((resolve) => {
    if (typeof cv.Mat === 'function') resolve();
    else cv.onRuntimeInitialized = resolve;
  });
  return { cv };
}
