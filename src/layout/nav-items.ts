import type { RouteName } from '../router/routes';

export interface NavItem {
  label: string;
  icon: string;
  route: RouteName;
}

/** The side navigation, in order. Who sees an item comes from its route's `meta.roles`, never from here. */
export const NAV_ITEMS: NavItem[] = [
  { label: 'Home', icon: 'pi pi-compass', route: 'home' },
  { label: 'People', icon: 'pi pi-users', route: 'people' },
];
