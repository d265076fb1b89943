import type { RouteName } from '../router/route-names';

export interface NavItem {
  label: string;
  icon: string;
  route: RouteName;
}

/** The side navigation, in order. Who sees an item comes from its route's `meta.roles`, never from here. */
export const NAV_ITEMS: NavItem[] = [
  { label: 'Home', icon: 'pi pi-compass', route: 'home' },
  { label: 'Upload', icon: 'pi pi-cloud-upload', route: 'upload' },
  { label: 'Clips', icon: 'pi pi-video', route: 'clips' },
  { label: 'Review', icon: 'pi pi-check-square', route: 'review-queue' },
  { label: 'Projects', icon: 'pi pi-folder', route: 'projects' },
  { label: 'Pairsets', icon: 'pi pi-box', route: 'pairsets' },
  { label: 'API tokens', icon: 'pi pi-key', route: 'api-tokens' },
  { label: 'People', icon: 'pi pi-users', route: 'people' },
  { label: 'Storage', icon: 'pi pi-database', route: 'admin-usage' },
  { label: 'Worker jobs', icon: 'pi pi-cog', route: 'admin-jobs' },
  { label: 'Audit log', icon: 'pi pi-list', route: 'admin-audit' },
  { label: 'Settings', icon: 'pi pi-sliders-h', route: 'admin-settings' },
  { label: 'Mail log', icon: 'pi pi-envelope', route: 'mail-log' },
  { label: 'Profile', icon: 'pi pi-id-card', route: 'profile' },
];
