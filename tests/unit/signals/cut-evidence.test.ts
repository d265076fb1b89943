import { beforeAll, describe, expect, it } from 'vitest';
import { cutThumb, edgeChangeRatio, pairEvidence, sobelEdges } from '../../../worker/signals/cut-evidence';
import { globalShift } from '../../../worker/signals/global-shift';
import { loadOpenCv, type OpenCv } from './opencv';
import { texturedGrey } from './synthetic-frames';
import { texture } from '../../helpers/motion-pairs';

let cv: OpenCv;
beforeAll(async () => {
  ({ cv } = await loadOpenCv());
});

/** The value-noise texture of the motion tests, seen through a window at (x0, y0). */
function window(width: number, height: number, x0: number, y0: number, seed = 3): Float32Array {
  const grey = new Float32Array(width * height);
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) grey[y * width + x] = texture(x + x0, y + y0, seed);
  }
  return grey;
}

describe('edge change ratio (Zabih, Miller & Mai 1995)', () => {
  // Worked by hand: 4 edge pixels before, 4 after; 3 of the old ones lie within one pixel of a new one, 1 does not;
  // 2 new ones lie away from every old one: ECR = max(2/4, 1/4) = 0.5.
  it('is the larger of the entering and leaving shares, with edges kept within the radius', () => {
    const width = 12;
    const height = 3;
    const prev = new Uint8Array(width * height);
    const next = new Uint8Array(width * height);
    for (const x of [1, 2, 3, 9]) prev[width + x] = 1;
    for (const x of [1, 3, 6, 11]) next[width + x] = 1;
    // old 9 has no new edge within 1 px (new ones at 6 and 11): leaving 1 of 4; new 6 and 11 have no old edge near.
    expect(edgeChangeRatio(prev, next, width, height)).toBe(0.5);
    expect(edgeChangeRatio(prev, prev, width, height)).toBe(0);
  });

  it("marks Sobel edges where OpenCV's Sobel magnitude (|dx| + |dy|, 3×3) is large and the largest across", () => {
    const width = 40;
    const height = 30;
    const grey = texturedGrey(width, height, 5, { mean: 128, amplitude: 100 });
    const edges = sobelEdges(grey, width, height);
    const src = cv.matFromArray(height, width, cv.CV_32F, Array.from(grey));
    const dx = new cv.Mat();
    const dy = new cv.Mat();
    cv.Sobel(src, dx, cv.CV_32F, 1, 0, 3, 1, 0, cv.BORDER_REFLECT_101);
    cv.Sobel(src, dy, cv.CV_32F, 0, 1, 3, 1, 0, cv.BORDER_REFLECT_101);
    const gx = dx.data32F;
    const gy = dy.data32F;
    let checked = 0;
    for (let y = 1; y < height - 1; y += 1) {
      for (let x = 1; x < width - 1; x += 1) {
        const p = y * width + x;
        const magnitude = Math.abs(gx[p]!) + Math.abs(gy[p]!);
        // An edge pixel has at least the threshold in OpenCV's terms too; far below it, none is.
        if (edges[p]) expect(magnitude).toBeGreaterThanOrEqual(120 - 1e-3);
        if (magnitude < 100) expect(edges[p]).toBe(0);
        checked += 1;
      }
    }
    expect(checked).toBe((width - 2) * (height - 2));
    [src, dx, dy].forEach((mat) => mat.delete());
  });
});

describe('global shift', () => {
  it('finds a known shift of the camera window, including one a third of the width', () => {
    const base = window(80, 45, 200, 100);
    for (const [dx, dy] of [
      [0, 0],
      [7, -3],
      [-26, 9],
      [12, 14],
    ] as const) {
      const moved = window(80, 45, 200 + dx, 100 + dy);
      // moved(x) = base(x + d), so base(x) = moved(x − d): the shift from base to moved is −d.
      const found = globalShift(base, moved, 80, 45);
      expect([found.dx, found.dy]).toEqual([0 - dx || 0, 0 - dy || 0]);
      expect(found.error).toBe(0);
    }
  });
});

describe('pair evidence', () => {
  it('explains a shifted window and fails on two unrelated windows', () => {
    const width = 320;
    const height = 180;
    const first = window(width, height, 0, 0, 7);
    const panned = window(width, height, 40, 8, 7);
    const other = window(width, height, 0, 0, 8);
    const same = pairEvidence(cutThumb(first, width, height), cutThumb(panned, width, height));
    const cut = pairEvidence(cutThumb(first, width, height), cutThumb(other, width, height));
    expect(same.warpError).toBeLessThan(0.25);
    // Independent values of one distribution: E|X − Y| is about 1.1–1.4 times their mean deviation.
    expect(cut.warpError).toBeGreaterThan(0.8);
    // Edges are compared after the camera's shift, so the pan keeps most of its edges and the cut does not.
    expect(same.edgeChange).toBeLessThan(0.3);
    expect(cut.edgeChange).toBeGreaterThan(2 * same.edgeChange);
  });
});

describe('quiet pairs', () => {
  const width = 320;
  const height = 180;
  const first = window(width, height, 0, 0, 7);

  it('spare the fields of a dim, grainy pan, and keep the warp error of the last shift for it', () => {
    // Faint texture (a third of its contrast) under grain of ±10 grey levels, panned by half a coarse pixel: the
    // shift alone leaves a warp error above 0.25, so the fields ran; its tones and edges (none reach the edge
    // level) stay quiet.
    let state = 1;
    const grain = () => ((state = (state * 1103515245 + 12345) % 2 ** 31) / 2 ** 31) * 20 - 10;
    const dim = (x0: number, y0: number) =>
      window(width, height, x0, y0, 7).map((value) => 128 + 0.3 * (value - 128) + grain());
    const before = cutThumb(dim(0, 0), width, height);
    const after = cutThumb(dim(2.5, 1), width, height);
    const full = pairEvidence(before, after);
    const quiet = pairEvidence(before, after, undefined, null, 0);
    expect(full.motionConsistency).not.toBeNull();
    expect(quiet.motionConsistency).toBeNull();
    expect(quiet.edgeChange).toBeLessThan(0.08);
    expect(quiet.warpError).toBeGreaterThan(0.25);
    expect(quiet.warpError).toBeGreaterThanOrEqual(full.warpError);
    expect(quiet.warpError).toBeLessThan(0.6);
  });

  it('still measure a jump to another part of one scene, whose histogram is as quiet', () => {
    const elsewhere = window(width, height, 150, 90, 7);
    const jump = pairEvidence(cutThumb(first, width, height), cutThumb(elsewhere, width, height), undefined, null, 0);
    expect(jump.motionConsistency).not.toBeNull();
    expect(jump.warpError).toBeGreaterThan(0.8);
  });
});
