import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import type { ReviewQueueItem } from '../../shared/types/review';
import { nextSort, sortState } from '../../src/components/review/queue-columns';
import ReviewQueueTable from '../../src/components/review/ReviewQueueTable.vue';
import { stubbedRoutes } from './stub-routes';

function item(id: number, extra: Partial<ReviewQueueItem> = {}): ReviewQueueItem {
  return {
    id,
    originalName: `field-${id}.mp4`,
    projectId: 1,
    projectName: 'Hillside plots',
    site: 'Upper terrace',
    uploaderId: 2,
    uploaderName: 'Tove Marrow',
    durationS: 6,
    capturedAt: null,
    createdAt: new Date().toISOString(),
    hasThumbnail: false,
    flags: [],
    frameCount: 30,
    medianSharpness: 512.4,
    meanLuma: 0.4,
    meanMotion: null,
    consistentShare: 0.953,
    cutCount: 0,
    usablePairs: 58,
    claim: null,
    ...extra,
  };
}

function mountTable(props: { items: ReviewQueueItem[]; selected?: ReviewQueueItem[]; sort?: string }) {
  const router = createRouter({ history: createMemoryHistory(), routes: stubbedRoutes() });
  return mount(ReviewQueueTable, {
    props: {
      items: props.items,
      selected: props.selected ?? [],
      sort: props.sort,
      loading: false,
      compact: false,
      query: {},
      showPictures: false,
    },
    global: { plugins: [router] },
  });
}

describe('the queue order a header click gives', () => {
  it('sorts ascending first, then turns the order round each click', () => {
    expect(sortState(undefined, 'meanMotion')).toBe('none');
    expect(nextSort(undefined, 'meanMotion')).toBe('meanMotion');
    expect(sortState('meanMotion', 'meanMotion')).toBe('ascending');
    expect(nextSort('meanMotion', 'meanMotion')).toBe('-meanMotion');
    expect(sortState('-meanMotion', 'meanMotion')).toBe('descending');
    expect(nextSort('-meanMotion', 'meanMotion')).toBe('meanMotion');
    // Another column's order is left for this one's.
    expect(sortState('-cutCount', 'meanMotion')).toBe('none');
    expect(nextSort('-cutCount', 'meanMotion')).toBe('meanMotion');
  });
});

describe('ReviewQueueTable', () => {
  it('shows one row per clip with its signals, "—" where a signal is unavailable', () => {
    const wrapper = mountTable({ items: [item(1), item(2, { flags: ['dark'], meanMotion: 2.345 })] });
    const rows = wrapper.findAll('tbody tr');
    expect(rows).toHaveLength(2);
    const first = rows[0]!.findAll('td').map((cell) => cell.text());
    expect(first).toContain('512');
    expect(first).toContain('95 %');
    expect(first).toContain('—');
    expect(rows[1]!.text()).toContain('2.35');
    expect(rows[1]!.text()).toContain('dark');
  });

  it('picks a whole page from the header box, keeping clips picked on other pages', async () => {
    const elsewhere = item(9);
    const items = [item(1), item(2), item(3)];
    const wrapper = mountTable({ items, selected: [elsewhere, items[1]!] });
    const pageBox = wrapper.find<HTMLInputElement>('[data-test="queue-pick-page"]');
    expect(pageBox.element.indeterminate).toBe(true);
    await pageBox.trigger('change');
    const picked = wrapper.emitted('update:selected')!.at(-1)![0] as ReviewQueueItem[];
    expect(picked.map((clip) => clip.id).sort()).toEqual([1, 2, 3, 9]);

    await wrapper.setProps({ selected: picked });
    expect(pageBox.element.checked).toBe(true);
    await pageBox.trigger('change');
    expect((wrapper.emitted('update:selected')!.at(-1)![0] as ReviewQueueItem[]).map((clip) => clip.id)).toEqual([9]);
  });

  it('picks and unpicks one row', async () => {
    const items = [item(1), item(2)];
    const wrapper = mountTable({ items, selected: [items[0]!] });
    await wrapper.find('[data-test="queue-pick-2"]').trigger('change');
    expect((wrapper.emitted('update:selected')![0]![0] as ReviewQueueItem[]).map((clip) => clip.id)).toEqual([1, 2]);
    await wrapper.setProps({ selected: [items[0]!, items[1]!] });
    await wrapper.find('[data-test="queue-pick-1"]').trigger('change');
    expect((wrapper.emitted('update:selected')![1]![0] as ReviewQueueItem[]).map((clip) => clip.id)).toEqual([2]);
  });

  it('asks for the next order from a sortable header and marks the column sorted', async () => {
    const wrapper = mountTable({ items: [item(1)], sort: '-medianSharpness' });
    const header = wrapper.find('[data-test="queue-sort-medianSharpness"]');
    expect(header.element.closest('th')!.getAttribute('aria-sort')).toBe('descending');
    await header.trigger('click');
    await wrapper.find('[data-test="queue-sort-cutCount"]').trigger('click');
    expect(wrapper.emitted('sort')).toEqual([['medianSharpness'], ['cutCount']]);
  });
});
