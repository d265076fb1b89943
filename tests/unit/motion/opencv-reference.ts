// OpenCV compiled to WebAssembly (@techstark/opencv-js, a devDependency) as the reference implementation for the
// motion tests. Its module object has a `then`, so awaiting it would hang: wait for onRuntimeInitialized instead.

import { createRequire } from 'node:module';

interface CvMat {
  data32F: Float32Array;
  delete(): void;
}

interface CvSize {
  width: number;
  height: number;
}

/** The few OpenCV calls the tests use, with OpenCV's argument order. */
export interface OpenCv {
  CV_32F: number;
  BORDER_DEFAULT: number;
  INTER_LINEAR: number;
  Mat: new () => CvMat;
  Size: new (width: number, height: number) => CvSize;
  matFromArray(rows: number, cols: number, type: number, data: ArrayLike<number>): CvMat;
  calcOpticalFlowFarneback(
    prev: CvMat,
    next: CvMat,
    flow: CvMat,
    pyrScale: number,
    levels: number,
    winSize: number,
    iterations: number,
    polyN: number,
    polySigma: number,
    flags: number,
  ): void;
  GaussianBlur(src: CvMat, dst: CvMat, size: CvSize, sigmaX: number, sigmaY: number, border: number): void;
  resize(src: CvMat, dst: CvMat, size: CvSize, fx: number, fy: number, interpolation: number): void;
  onRuntimeInitialized?: () => void;
}

// OpenCV's OPTFLOW_FARNEBACK_GAUSSIAN flag value (video/tracking.hpp) [M].
export const OPTFLOW_FARNEBACK_GAUSSIAN = 256;

/** Wrapped, because a promise resolved with the thenable module object would adopt it and never settle. */
export interface OpenCvHandle {
  cv: OpenCv;
}

let loading: Promise<OpenCvHandle> | undefined;

export function loadOpenCv(): Promise<OpenCvHandle> {
  loading ??= new Promise<OpenCvHandle>((resolve) => {
    const cv = createRequire(import.meta.url)('@techstark/opencv-js') as OpenCv;
    const ready = (): void => resolve({ cv });
    if (typeof (cv as { Mat?: unknown }).Mat === 'function') ready();
    else cv.onRuntimeInitialized = ready;
  });
  return loading;
}

/** Runs `use` with a 32-bit float Mat holding `data`, and frees the Mat afterwards. */
export function withMat<T>(cv: OpenCv, data: Float32Array, rows: number, cols: number, use: (mat: CvMat) => T): T {
  const mat = cv.matFromArray(rows, cols, cv.CV_32F, data);
  try {
    return use(mat);
  } finally {
    mat.delete();
  }
}
