import { flushPromises, mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import PrimeVue from 'primevue/config';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { FrameCut } from '../../shared/types/cuts';
import ClipCutMarks from '../../src/components/clips/ClipCutMarks.vue';
import { useSessionStore } from '../../src/stores/session';

function jsonResponse(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

const detectedCut: FrameCut = {
  index: 7,
  timeS: 1.4,
  detected: true,
  cutBefore: true,
  mark: null,
  evidence: {
    histogramDistance: 0.131,
    edgeChange: 0.32,
    motionConsistency: 0.96,
    warpError: 1.06,
    localWarpError: 0.08,
    fired: { warp: 0.45, histogram: 0.02 },
    kind: 'hard',
  },
};

function mountAs(role: 'curator' | 'operator', selected: number) {
  const pinia = createPinia();
  setActivePinia(pinia);
  useSessionStore().user = { id: 4, role, name: 'Rin Ode', email: `${role}@example.test` } as never;
  return mount(ClipCutMarks, { props: { clipId: 3, selected }, global: { plugins: [pinia, PrimeVue] } });
}

describe('ClipCutMarks', () => {
  beforeEach(() => setActivePinia(createPinia()));
  afterEach(() => vi.unstubAllGlobals());

  it('explains the cut before the selected frame: its measures, which fired and at what threshold', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => jsonResponse(200, { items: [detectedCut] })),
    );
    const wrapper = mountAs('operator', 7);
    await flushPromises();
    expect(wrapper.find('[data-test="cut-here"]').text()).toContain('The detector found a hard cut.');
    const rows = wrapper.findAll('[data-test="cut-evidence"] tr').map((row) => row.text());
    expect(rows.find((row) => row.startsWith('Motion left unexplained'))).toContain('1.060');
    expect(rows.find((row) => row.startsWith('Motion left unexplained'))).toContain('fired (at least 0.450)');
    expect(rows.find((row) => row.startsWith('Edge change'))).not.toContain('fired');
    // Operators read the explanation but cannot mark.
    expect(wrapper.find('[data-test="cut-unmark"]').exists()).toBe(false);
  });

  it('lets a curator remove a detected cut, sending the mark and showing what counts now', async () => {
    const removed: FrameCut = {
      ...detectedCut,
      cutBefore: false,
      mark: {
        value: 'none',
        byUserId: 4,
        byName: 'Rin Ode',
        at: '2026-05-02T10:00:00.000Z',
      },
    };
    const fetchMock = vi.fn(async (url: string, init?: RequestInit) => {
      if (url.startsWith('/api/auth/csrf')) return jsonResponse(200, { token: 'token-1' });
      if (init?.method === 'PUT') return jsonResponse(200, removed);
      return jsonResponse(200, { items: [detectedCut] });
    });
    vi.stubGlobal('fetch', fetchMock);
    const wrapper = mountAs('curator', 7);
    await flushPromises();
    await wrapper.find('[data-test="cut-unmark"]').trigger('click');
    await flushPromises();
    const put = fetchMock.mock.calls.find(([, init]) => init?.method === 'PUT')!;
    expect(put[0]).toBe('/api/clips/3/cuts/7');
    expect(JSON.parse(String(put[1]!.body))).toEqual({ value: 'none' });
    expect(wrapper.find('[data-test="cut-here"]').text()).toContain('cut removed by hand');
    expect(wrapper.emitted('update:overrides')!.at(-1)![0]).toEqual(new Map([[7, false]]));
  });
});
