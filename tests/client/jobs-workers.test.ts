import { flushPromises, mount } from '@vue/test-utils';
import { createPinia } from 'pinia';
import PrimeVue from 'primevue/config';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { WorkerSummary } from '../../shared/types/admin';
import JobsWorkers from '../../src/components/admin/JobsWorkers.vue';

function jsonResponse(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

const worker = (host: string, state: WorkerSummary['state'], jobsRunning: number): WorkerSummary => ({
  name: `${host}:51:abcd`,
  host,
  pid: 51,
  version: '0.1.0',
  leaseS: 60,
  jobsRunning,
  startedAt: '2026-01-05T08:00:00.000Z',
  lastBeatAt: '2026-01-05T09:00:00.000Z',
  state,
});

describe('JobsWorkers', () => {
  afterEach(() => vi.unstubAllGlobals());

  it('lists each worker from GET /api/jobs/workers with its host, pid, version, running jobs and state', async () => {
    const fetch = vi.fn(async () => jsonResponse(200, [worker('rack-a', 'active', 2), worker('rack-b', 'stale', 1)]));
    vi.stubGlobal('fetch', fetch);
    const wrapper = mount(JobsWorkers, { global: { plugins: [createPinia(), PrimeVue] } });
    await flushPromises();
    expect(String((fetch.mock.calls[0] as unknown[])[0])).toContain('/api/jobs/workers');
    const rows = wrapper.findAll('[data-test="workers-table"] tbody tr').map((row) => row.text());
    expect(rows).toHaveLength(2);
    expect(rows[0]).toMatch(/rack-a.*51.*0\.1\.0.*2.*active/);
    expect(rows[1]).toMatch(/rack-b.*stale/);
    wrapper.unmount();
  });

  it('says how to start a worker when none has announced itself', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => jsonResponse(200, [])),
    );
    const wrapper = mount(JobsWorkers, { global: { plugins: [createPinia(), PrimeVue] } });
    await flushPromises();
    expect(wrapper.text()).toContain('npm run worker');
    wrapper.unmount();
  });
});
