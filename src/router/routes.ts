import type { RouteRecordRaw } from 'vue-router';
import type { RouteName } from './route-names';


export const routes: (RouteRecordRaw & { name?: RouteName })[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('../views/auth/SignInView.vue'),
    meta: { title: 'Sign in' },
  },
  {
    path: '/invite/:token',
    name: 'invitation',
    component: () => import('../views/auth/InvitationView.vue'),
    props: true,
    meta: { title: 'Invitation' },
  },
  {
    path: '/forgot-password',
    name: 'forgot-password',
    component: () => import('../views/auth/ForgotPasswordView.vue'),
    meta: { title: 'Forgot password' },
  },
  {
    path: '/reset-password/:token',
    name: 'reset-password',
    component: () => import('../views/auth/ResetPasswordView.vue'),
    props: true,
    meta: { title: 'New password' },
  },
  {
    path: '/',
    component: () => import('../layout/TheShell.vue'),
    meta: { requiresAuth: true },
    children: [
      { path: '', name: 'home', component: () => import('../views/home/HomeView.vue'), meta: { title: 'Home' } },
      {
        path: 'people',
        name: 'people',
        component: () => import('../views/people/PeopleView.vue'),
        meta: { title: 'People', roles: ['admin'] },
      },
      {
        path: 'mail',
        name: 'mail-log',
        component: () => import('../views/mail/MailLogView.vue'),
        meta: { title: 'Mail log', roles: ['admin'] },
      },
      {
        path: 'profile',
        name: 'profile',
        component: () => import('../views/profile/ProfileView.vue'),
        meta: { title: 'Profile' },
      },
      {
        path: 'projects',
        name: 'projects',
        component: () => import('../views/projects/ProjectsView.vue'),
        meta: { title: 'Projects' },
      },
      {
        path: 'upload',
        name: 'upload',
        component: () => import('../views/upload/UploadView.vue'),
        meta: { title: 'Upload', roles: ['operator'] },
      },
      {
        path: 'clips',
        name: 'clips',
        component: () => import('../views/clips/ClipsView.vue'),
        meta: { title: 'Clips' },
      },
      {
        path: 'clips/:id(\\d+)',
        name: 'clip-detail',
        component: () => import('../views/clips/ClipDetailView.vue'),
        props: true,
        meta: { title: 'Clip' },
      },
      {
        path: 'review',
        name: 'review-queue',
        component: () => import('../views/review/ReviewQueueView.vue'),
        meta: { title: 'Review', roles: ['curator'] },
      },
      {
        path: 'review/:id(\\d+)',
        name: 'review-clip',
        component: () => import('../views/review/ReviewClipView.vue'),
        props: true,
        meta: { title: 'Review clip', roles: ['curator'] },
      },
      {
        path: 'admin/usage',
        name: 'admin-usage',
        component: () => import('../views/admin/UsageView.vue'),
        meta: { title: 'Storage', roles: ['admin'] },
      },
      {
        path: 'admin/jobs',
        name: 'admin-jobs',
        component: () => import('../views/admin/JobsView.vue'),
        meta: { title: 'Worker jobs', roles: ['admin'] },
      },
      {
        path: 'admin/settings',
        name: 'admin-settings',
        component: () => import('../views/admin/SettingsView.vue'),
        meta: { title: 'Settings', roles: ['admin'] },
      },
      {
        path: 'admin/audit',
        name: 'admin-audit',
        component: () => import('../views/admin/AuditLogView.vue'),
        meta: { title: 'Audit log', roles: ['admin'] },
      },
      {
        path: 'pairsets',
        name: 'pairsets',
        component: () => import('../views/pairsets/PairsetsView.vue'),
        meta: { title: 'Pairsets', roles: ['engineer'] },
      },
      {
        path: 'pairsets/new',
        name: 'pairset-new',
        component: () => import('../views/pairsets/PairsetDefineView.vue'),
        meta: { title: 'New pairset', roles: ['engineer'] },
      },
      {
        path: 'pairsets/:id(\\d+)',
        name: 'pairset-detail',
        component: () => import('../views/pairsets/PairsetDetailView.vue'),
        props: true,
        meta: { title: 'Pairset', roles: ['engineer'] },
      },
      {
        path: 'api-tokens',
        name: 'api-tokens',
        component: () => import('../views/tokens/ApiTokensView.vue'),
        meta: { title: 'API tokens', roles: ['engineer'] },
      },
      {
        path: 'not-allowed',
        name: 'not-allowed',
        component: () => import('../views/errors/NotAllowedView.vue'),
        meta: { title: 'Not allowed' },
      },
      {
        path: ':pathMatch(.*)*',
        name: 'not-found',
        component: () => import('../views/errors/NotFoundView.vue'),
        meta: { title: 'Not found' },
      },
    ],
  },
];
