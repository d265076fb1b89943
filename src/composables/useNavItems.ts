import { computed } from 'vue';
import { useRouter } from 'vue-router';
import { roleAllows } from '../../shared/roles';
import { NAV_ITEMS, type NavItem } from '../layout/nav-items';
import { useSessionStore } from '../stores/session';

/** The navigation items the signed-in person may use, read from each route's role list. */
export function useNavItems() {
  const router = useRouter();
  const session = useSessionStore();
  return computed<NavItem[]>(() => {
    const user = session.user;
    if (!user) return [];
    return NAV_ITEMS.filter((item) => {
      const roles = router.resolve({ name: item.route }).meta.roles;
      return !roles || roleAllows(user.role, roles);
    });
  });
}
