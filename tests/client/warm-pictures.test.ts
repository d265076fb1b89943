import { afterEach, describe, expect, it, vi } from 'vitest';
import type { ClipDetail } from '../../shared/types/clips';
import type { ClipFrame } from '../../shared/types/frames';
import { warmPictures, type ClipEvidence } from '../../src/components/review/clip-evidence';

/**
 * The pictures fetched ahead must be exactly the addresses the review screen then shows: the document reuses a
 * picture it holds only under the same address, and a missed one keeps the clip from being complete in the first
 * frame after the key (the strip once moved to small pictures, and frame 0 whole was no longer fetched ahead).
 */
function evidence(frameCount: number): ClipEvidence {
  const frames = Array.from({ length: frameCount }, (_, index) => ({
    index,
    motion: index < frameCount - 1 ? {} : null,
  }));
  return {
    detail: { id: 7, hasThumbnail: true } as ClipDetail,
    frames: frames as unknown as ClipFrame[],
    motionScale: null,
    deltas: [1, 2],
  };
}

afterEach(() => vi.unstubAllGlobals());

describe('pictures fetched ahead for the review screen', () => {
  it('are frame 0 whole with its motion picture, views and neighbours, and the strip at 34 pixels high', () => {
    vi.stubGlobal('devicePixelRatio', 1);
    const urls = warmPictures(evidence(20)).map((image) => new URL(image.src).pathname + new URL(image.src).search);
    expect(urls.slice(0, 7)).toEqual([
      '/api/clips/7/thumbnail',
      '/api/clips/7/frames/0',
      '/api/clips/7/views/0/luma',
      '/api/clips/7/views/0/chroma',
      '/api/clips/7/motion/0',
      '/api/clips/7/frames/1',
      '/api/clips/7/frames/2',
    ]);
    const strip = urls.slice(7);
    expect(strip).toHaveLength(28);
    expect(strip.slice(0, 2)).toEqual(['/api/clips/7/frames/0?height=34', '/api/clips/7/motion/0?height=34']);
    expect(strip.every((url) => url.endsWith('?height=34'))).toBe(true);
  });

  it('asks for the strip at twice the height on a high-density screen, as the strip does', () => {
    vi.stubGlobal('devicePixelRatio', 2);
    const urls = warmPictures(evidence(3)).map((image) => image.src);
    expect(urls.filter((url) => url.includes('height=')).every((url) => url.endsWith('?height=68'))).toBe(true);
  });
});
