import { flushPromises, mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import PrimeVue from 'primevue/config';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { stubbedRoutes } from './stub-routes';
import SignInView from '../../src/views/auth/SignInView.vue';

function jsonResponse(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

describe('SignInView', () => {
  beforeEach(() => setActivePinia(createPinia()));
  afterEach(() => vi.unstubAllGlobals());

  it("shows the server's error message when sign-in is refused", async () => {
    const fetchMock = vi.fn(async (url: string) => {
      if (url.startsWith('/api/auth/csrf')) return jsonResponse(200, { token: 'token-1' });
      return jsonResponse(401, {
        error: { code: 'wrong_credentials', message: 'E-mail address or password is wrong.' },
      });
    });
    vi.stubGlobal('fetch', fetchMock);
    const router = createRouter({ history: createMemoryHistory(), routes: stubbedRoutes() });
    const wrapper = mount(SignInView, { global: { plugins: [router, PrimeVue] } });

    await wrapper.find('#sign-in-email').setValue('someone@example.test');
    await wrapper.find('#sign-in-password').setValue('wrong-password-here');
    await wrapper.find('form').trigger('submit');
    await flushPromises();

    expect(wrapper.find('[data-test="sign-in-error"]').text()).toContain('E-mail address or password is wrong.');
    const signInCall = fetchMock.mock.calls.find(([url]) => url === '/api/auth/sign-in') as unknown[] | undefined;
    const init = signInCall?.[1] as RequestInit;
    expect(JSON.parse(String(init.body))).toEqual({ email: 'someone@example.test', password: 'wrong-password-here' });
    expect((init.headers as Record<string, string>)['x-csrf-token']).toBe('token-1');
  });
});
