import { mount } from '@vue/test-utils';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { ClipFrame } from '../../shared/types/frames';
import ClipFrameStrip from '../../src/components/clips/ClipFrameStrip.vue';

const frames = [
  { index: 0, timeS: 0, cutBefore: false, motion: { meanPx: 1 } },
  { index: 1, timeS: 0.2, cutBefore: false, motion: null },
] as unknown as ClipFrame[];

function mountStrip(height?: 34 | 54) {
  return mount(ClipFrameStrip, {
    props: { clipId: 5, frames, selected: 0, ...(height ? { height } : {}) },
    global: { stubs: { ClipCutMarks: true } },
  });
}

afterEach(() => vi.unstubAllGlobals());

describe('ClipFrameStrip', () => {
  it('draws its pictures at the height asked and fetches them shrunk to it', () => {
    vi.stubGlobal('devicePixelRatio', 1);
    const strip = mountStrip(34);
    const sources = strip.findAll('img').map((image) => image.attributes('src'));
    expect(sources).toEqual([
      '/api/clips/5/frames/0?height=34',
      '/api/clips/5/motion/0?height=34',
      '/api/clips/5/frames/1?height=34',
    ]);
    expect(strip.get('[data-test="frame-strip"]').attributes('style')).toContain('--kf-strip-height: 34px');
  });

  it('is 54 pixels high unless told, with twice the pixels on a high-density screen', () => {
    vi.stubGlobal('devicePixelRatio', 2);
    const strip = mountStrip();
    expect(strip.get('img').attributes('src')).toBe('/api/clips/5/frames/0?height=108');
    expect(strip.get('[data-test="frame-strip"]').attributes('style')).toContain('--kf-strip-height: 54px');
  });
});
