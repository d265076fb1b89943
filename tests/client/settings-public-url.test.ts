import { flushPromises, mount } from '@vue/test-utils';
import PrimeVue from 'primevue/config';
import { afterEach, describe, expect, it, vi } from 'vitest';
import SettingsPublicUrl from '../../src/components/admin/SettingsPublicUrl.vue';

function answerWith(body: unknown): void {
  vi.stubGlobal(
    'fetch',
    vi.fn(
      async () => new Response(JSON.stringify(body), { status: 200, headers: { 'Content-Type': 'application/json' } }),
    ),
  );
}

describe('SettingsPublicUrl', () => {
  afterEach(() => vi.unstubAllGlobals());

  it('shows the derived public URL without a warning when it is the address in use', async () => {
    answerWith({ publicUrl: window.location.origin, source: 'derived' });
    const wrapper = mount(SettingsPublicUrl, { global: { plugins: [PrimeVue] } });
    await flushPromises();
    expect(wrapper.find('[data-test="settings-public-url"]').text()).toContain(window.location.origin);
    expect(wrapper.text()).toContain('derived from the port');
    expect(wrapper.find('[data-test="settings-public-url-warning"]').exists()).toBe(false);
  });

  it('warns when mailed links lead elsewhere than the address in use', async () => {
    answerWith({ publicUrl: 'https://kinefold.example.test', source: 'configured' });
    const wrapper = mount(SettingsPublicUrl, { global: { plugins: [PrimeVue] } });
    await flushPromises();
    expect(wrapper.text()).toContain('set by KINEFOLD_PUBLIC_URL');
    const warning = wrapper.find('[data-test="settings-public-url-warning"]');
    expect(warning.exists()).toBe(true);
    expect(warning.text()).toContain(`You are using ${window.location.origin}`);
  });
});
