import { createRouter, createWebHistory } from 'vue-router';
import { useSessionStore } from '../stores/session';
import { resolveAccess } from './access';
import { routes } from './routes';

export function createKinefoldRouter() {
  const router = createRouter({ history: createWebHistory(), routes });
  router.beforeEach(async (to) => {
    const session = useSessionStore();
    await session.load();
    return resolveAccess(to, session.user);
  });
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Kinefold` : 'Kinefold';
  });
  return router;
}

export const router = createKinefoldRouter();
