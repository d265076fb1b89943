/** Every named route of the client; navigation items and links name routes by these. */
export type RouteName =
  | 'sign-in' | 'home' | 'people' | 'not-allowed' | 'not-found'
  | 'projects' | 'upload' | 'clips' | 'clip-detail'
  | 'invitation' | 'forgot-password' | 'reset-password' | 'profile' | 'mail-log'
  | 'admin-usage' | 'admin-jobs' | 'admin-audit' | 'admin-settings'
  | 'review-queue' | 'review-clip'
  | 'pairsets' | 'pairset-new' | 'pairset-detail' | 'api-tokens';
