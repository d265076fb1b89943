import type { RouteLocationNormalized, RouteLocationRaw } from 'vue-router';
import type { Me } from '../../shared/api-types';
import { roleAllows, type Role } from '../../shared/roles';

declare module 'vue-router' {
  interface RouteMeta {
    /** Signed-in users only. */
    requiresAuth?: boolean;
    /** Roles that may open the page (admin always may); absent means every signed-in user. */
    roles?: Role[];
    /** The page's title in the browser tab and the header. */
    title?: string;
  }
}

/**
 * Where a navigation may go: the sign-in page for the signed-out, the not-allowed page for the wrong role,
 * away from sign-in for the signed-in; `true` lets it through.
 */
export function resolveAccess(to: RouteLocationNormalized, user: Me | null): true | RouteLocationRaw {
  const needsAuth = to.matched.some((record) => record.meta.requiresAuth);
  if (needsAuth && !user) return { name: 'sign-in', query: to.fullPath === '/' ? {} : { next: to.fullPath } };
  if (to.name === 'sign-in' && user) return { name: 'home' };
  const roles = to.matched.flatMap((record) => record.meta.roles ?? []);
  if (user && roles.length > 0 && !roleAllows(user.role, roles)) {
    return { name: 'not-allowed', query: { from: to.fullPath } };
  }
  return true;
}
