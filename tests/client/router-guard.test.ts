import { describe, expect, it } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import type { Me } from '../../shared/api-types';
import type { Role } from '../../shared/roles';
import { resolveAccess } from '../../src/router/access';
import { stubbedRoutes } from './stub-routes';

function userWith(role: Role): Me {
  return {
    id: 1,
    email: `${role}@example.test`,
    name: 'Someone',
    role,
    disabled: false,
    quotaBytes: null,
    lastSignInAt: null,
    createdAt: '2026-01-01T00:00:00Z',
  };
}

/** Navigates a router that carries the app's route table and the same guard function as the app. */
async function landingFor(user: Me | null, path: string): Promise<string | undefined> {
  const router = createRouter({ history: createMemoryHistory(), routes: stubbedRoutes() });
  router.beforeEach((to) => resolveAccess(to, user));
  await router.push(path);
  return router.currentRoute.value.name?.toString();
}

describe('the router guard', () => {
  it('sends a curator away from admin pages to the not-allowed page', async () => {
    expect(await landingFor(userWith('curator'), '/people')).toBe('not-allowed');
  });

  it('lets an admin in', async () => {
    expect(await landingFor(userWith('admin'), '/people')).toBe('people');
  });

  it('sends a signed-out visitor to sign-in, keeping where they wanted to go', async () => {
    const router = createRouter({ history: createMemoryHistory(), routes: stubbedRoutes() });
    router.beforeEach((to) => resolveAccess(to, null));
    await router.push('/people');
    expect(router.currentRoute.value.name).toBe('sign-in');
    expect(router.currentRoute.value.query.next).toBe('/people');
  });

  it('sends a signed-in user from the sign-in page to home', async () => {
    expect(await landingFor(userWith('operator'), '/sign-in')).toBe('home');
  });
});
