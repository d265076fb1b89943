import { mount } from '@vue/test-utils';
import PrimeVue from 'primevue/config';
import { describe, expect, it } from 'vitest';
import { CLIP_STAGES } from '../../shared/pipeline-stages';
import type { ClipFrame } from '../../shared/types/frames';
import ClipFrameViews from '../../src/components/clips/ClipFrameViews.vue';

/** Two sampled frames as they stand after sampling and signals, before motion. */
const frames: ClipFrame[] = [0, 1].map((index) => ({
  index,
  timeS: index * 0.2,
  meanLuma: 120,
  contrast: 0.2,
  sharpness: 300,
  clippedShare: 0,
  cutBefore: false,
  motion: null,
}));

function viewsAfter(stagesDone: (typeof CLIP_STAGES)[number][]) {
  return mount(ClipFrameViews, {
    props: { clipId: 9, index: 0, frames, motionScale: null, stagesDone },
    global: { plugins: [PrimeVue] },
  });
}

describe('the frame views while a clip is processed', () => {
  it('asks only for pictures that exist: nothing but placeholders before the frames are sampled', () => {
    const wrapper = viewsAfter([]);
    const sources = wrapper.findAll('img').map((image) => image.attributes('src'));
    expect(sources).toEqual(['/api/clips/9/frames/0']);
    expect(wrapper.findAll('[data-test="view-pending"]')).toHaveLength(2);
    expect(wrapper.text()).toContain('Estimated by the motion stage, still to come.');
  });

  it('derives luma and chroma once the frame is sampled, with a placeholder for motion until its stage', () => {
    const wrapper = viewsAfter(['sample', 'signals']);
    const sources = wrapper.findAll('img').map((image) => image.attributes('src'));
    expect(sources).toEqual(['/api/clips/9/frames/0', '/api/clips/9/views/0/luma', '/api/clips/9/views/0/chroma']);
    expect(wrapper.find('[data-test="view-pending"]').exists()).toBe(false);
    expect(wrapper.text()).toContain('Estimated by the motion stage, still to come.');
    expect(wrapper.text()).not.toContain('Motion is not estimated yet');
  });

  it('shows every view once processing is done, and says why a frame has no motion', () => {
    const wrapper = viewsAfter([...CLIP_STAGES]);
    const sources = wrapper.findAll('img').map((image) => image.attributes('src'));
    expect(sources).toEqual(['/api/clips/9/frames/0', '/api/clips/9/views/0/luma', '/api/clips/9/views/0/chroma']);
    expect(wrapper.find('[data-test="view-pending"]').exists()).toBe(false);
    expect(wrapper.text()).toContain('Motion is not estimated yet.');
  });
});
