import { createRouter, createWebHistory, type RouteRecordRaw } from 'vue-router';
import { useSessionStore } from '../stores/session';
// In the first script: a phone's page then waits for one round of lazy files, not two.
import PhoneLayout from '../layouts/PhoneLayout.vue';
import { loadFacilitatorMessages, phoneLocale, setLocale } from '../i18n';
import { installFacilitatorQuasar } from '../quasar-later';
import { wholeStylesheet } from '../theme/whole-stylesheet';
import { nextTask } from '../boot/next-task';

/**
 * Route meta: `public` routes need no sign-in; `admin` routes need the admin role; `phone` routes are a
 * participant's, who has no account, so they never ask for the sign-in cookie.
 */
declare module 'vue-router' {
  interface RouteMeta {
    public?: boolean;
    admin?: boolean;
    phone?: boolean;
  }
}

const routes: RouteRecordRaw[] = [
  {
    path: '/',
    component: () => import('../layouts/PlainLayout.vue'),
    children: [
      { path: '', redirect: { name: 'workshops' } },
      { path: 'sign-in', name: 'sign-in', component: () => import('../pages/sign-in.vue'), meta: { public: true } },
      { path: 'sign-up', name: 'sign-up', component: () => import('../pages/sign-up.vue'), meta: { public: true } },
      { path: 'forgot-password', name: 'forgot-password', component: () => import('../pages/forgot-password.vue'), meta: { public: true } },
      { path: 'reset-password', name: 'reset-password', component: () => import('../pages/reset-password.vue'), meta: { public: true } },
      { path: 'workshops', name: 'workshops', component: () => import('../pages/workshops.vue') },
      { path: 'workshops/:workshopId', name: 'workshop-plan', component: () => import('../pages/workshop-plan.vue'), props: true },
      { path: 'workshops/:workshopId/packing-list', name: 'packing-list', component: () => import('../pages/packing-list.vue'), props: true },
      { path: 'workshops/:workshopId/results', name: 'workshop-results', component: () => import('../pages/workshop-results.vue'), props: true },
      { path: 'workshops/:workshopId/report', name: 'workshop-report', component: () => import('../pages/workshop-report.vue'), props: true },
      // A phone's own data (address for the report, removing its notes); public: the phone holds its participant token.
      { path: 'phone/:sessionId/my-data', name: 'phone-data', component: () => import('../pages/phone-data.vue'), props: true, meta: { public: true, phone: true } },
      { path: 'invitations/accept', name: 'invitation-accept', component: () => import('../pages/invitation-accept.vue'), meta: { public: true } },
      { path: 'account', name: 'account', component: () => import('../pages/account.vue') },
      { path: 'admin/accounts', name: 'admin-accounts', component: () => import('../pages/admin-accounts.vue'), meta: { admin: true } },
      { path: 'dev/inbox', name: 'dev-inbox', component: () => import('../pages/dev-inbox.vue'), meta: { admin: true } },
    ],
  },
  {
    path: '/live/:workshopId',
    component: () => import('../layouts/ConsoleLayout.vue'),
    children: [{ path: 'console', name: 'live-console', component: () => import('../pages/live-console.vue'), props: true }],
  },
  {
    path: '/projector/:sessionId',
    component: () => import('../layouts/ProjectorLayout.vue'),
    // Public: a display link carries its own token; otherwise the signed-in facilitator's is used.
    children: [{ path: '', name: 'live-projector', component: () => import('../pages/live-projector.vue'), props: true, meta: { public: true } }],
  },
  {
    path: '/join',
    component: PhoneLayout,
    children: [
      { path: ':code?', name: 'join', component: () => import('../pages/join.vue'), meta: { public: true, phone: true } },
    ],
  },
  {
    path: '/phone/:sessionId',
    component: PhoneLayout,
    children: [{ path: '', name: 'phone', component: () => import('../pages/phone.vue'), props: true, meta: { public: true, phone: true } }],
  },
  {
    path: '/:pathMatch(.*)*',
    component: () => import('../layouts/PlainLayout.vue'),
    children: [{ path: '', name: 'not-found', component: () => import('../pages/not-found.vue'), meta: { public: true } }],
  },
];

/** Cairn's router; its guard sends signed-out people to sign-in and keeps non-admins off admin pages. */
export function createCairnRouter() {
  const router = createRouter({ history: createWebHistory(), routes });
  // The first navigation's guards and its page (asked for with its files, a link each that Vite's loader adds) run in
  // a task after the router's install.
  let first = true;
  router.beforeEach(async (to) => {
    if (first) {
      first = false;
      await nextTask();
    }
    // A phone speaks its participant's language; the projector page takes its session's (live-projector.vue);
    // the facilitator's screens are English.
    // A screen that is not a phone's needs the whole stylesheet, which a phone route's shell leaves out.
    if (to.meta.phone) await setLocale(phoneLocale());
    else if (to.name !== 'live-projector') {
      await Promise.all([setLocale('en').then(loadFacilitatorMessages), installFacilitatorQuasar(), wholeStylesheet()]);
    }
    // The projector's screen uses the facilitator's Quasar parts too (live-projector.vue sets its own language).
    if (to.name === 'live-projector') await Promise.all([installFacilitatorQuasar(), wholeStylesheet()]);
    // A phone has no account: asking for the sign-in cookie would only cost it a round trip and a 401.
    if (to.meta.phone) return true;
    const session = useSessionStore();
    // Public pages render at once and show the account when the sign-in cookie has been read.
    if (to.meta.public) {
      void session.restore();
      return true;
    }
    await session.restore();
    if (!session.signedIn) return { name: 'sign-in', query: { next: to.fullPath } };
    if (to.meta.admin && !session.isAdmin) return { name: 'workshops' };
    return true;
  });
  return router;
}
