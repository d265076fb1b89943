import { mount } from '@vue/test-utils';
import PrimeVue from 'primevue/config';
import Tag from 'primevue/tag';
import { afterEach, describe, expect, it } from 'vitest';
import { defineComponent, h, nextTick, ref } from 'vue';
import { keepLoadedStyles } from '../../src/theme/keep-loaded-styles';
import { KinefoldPreset } from '../../src/theme/preset';

/** A list of PrimeVue tags that grows by one each time `grow` is called, as the queue's rows and flags do. */
function mountGrowingTags(fixed: boolean) {
  const count = ref(1);
  const wrapper = mount(
    defineComponent(() => () => Array.from({ length: count.value }, (_, n) => h(Tag, { key: n, value: `tag ${n}` }))),
    {
      global: { plugins: [[PrimeVue, { theme: { preset: KinefoldPreset } }], ...(fixed ? [keepLoadedStyles] : [])] },
      attachTo: document.body,
    },
  );
  return {
    wrapper,
    grow: async () => {
      count.value += 1;
      await nextTick();
    },
  };
}

/** Counts the times PrimeVue writes the text of its base style sheet (each write is a new sheet to the browser). */
function countBaseSheetWrites(): { writes: () => number; stop: () => void } {
  let writes = 0;
  const observer = new MutationObserver((records) => {
    writes += records.filter(
      (record) => (record.target as Element).getAttribute?.('data-primevue-style-id') === 'base',
    ).length;
  });
  observer.observe(document.head, { childList: true, subtree: true, characterData: true });
  return {
    writes: () => writes,
    stop: () => observer.disconnect(),
  };
}

const flushObserver = () => new Promise((resolve) => setTimeout(resolve, 0));

describe('keepLoadedStyles', () => {
  afterEach(() => {
    document.head.innerHTML = '';
    document.body.innerHTML = '';
  });

  // The order of the cases matters: the first looks at PrimeVue as shipped, the others after the fix is in place.
  it('PrimeVue as shipped writes its base sheet again for every component it mounts', async () => {
    const { wrapper, grow } = mountGrowingTags(false);
    await flushObserver();
    const counter = countBaseSheetWrites();
    await grow();
    await grow();
    await flushObserver();
    counter.stop();
    wrapper.unmount();
    // When this fails, PrimeVue no longer forgets its sheets on each mount, and keep-loaded-styles.ts can go.
    expect(counter.writes()).toBeGreaterThanOrEqual(2);
  });

  it('with the fix, components mounted later write no sheet again', async () => {
    const { wrapper, grow } = mountGrowingTags(true);
    await flushObserver();
    expect(document.head.querySelector('style[data-primevue-style-id="base"]')?.textContent).not.toBe('');
    const counter = countBaseSheetWrites();
    await grow();
    await grow();
    await grow();
    await flushObserver();
    counter.stop();
    expect(wrapper.findAll('.p-tag')).toHaveLength(4);
    expect(counter.writes()).toBe(0);
    wrapper.unmount();
  });

  it('a sheet missing from the page is still written by the next component', async () => {
    const { wrapper, grow } = mountGrowingTags(true);
    await flushObserver();
    const base = () => document.head.querySelector('style[data-primevue-style-id="base"]');
    const text = base()!.textContent;
    base()!.remove();
    await grow();
    await flushObserver();
    expect(base()?.textContent).toBe(text);
    wrapper.unmount();
  });

  it('a real theme change still has the components write their sheets again', async () => {
    const { wrapper } = mountGrowingTags(true);
    await flushObserver();
    const counter = countBaseSheetWrites();
    // As an app changes its theme: through PrimeVue's configuration, which announces it with `theme:change`.
    wrapper.vm.$primevue.config.theme = { preset: KinefoldPreset, options: { darkModeSelector: '.kf-other' } };
    await nextTick();
    await flushObserver();
    counter.stop();
    expect(counter.writes()).toBeGreaterThanOrEqual(1);
    wrapper.unmount();
  });
});
