import type { RouteRecordRaw } from 'vue-router';

export type RouteName = 'sign-in' | 'home' | 'people' | 'not-allowed' | 'not-found';

export const routes: (RouteRecordRaw & { name?: RouteName })[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('../views/auth/SignInView.vue'),
    meta: { title: 'Sign in' },
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
