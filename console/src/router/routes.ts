/**
 * The console's pages. `consoleRoutes` are the pages inside the signed-in layout; the navigation
 * drawer is built from this array (in this order), showing each page only to the roles in
 * `meta.roles`. The router guard refuses a page to any other role as well (the server checks
 * again: this only keeps people away from pages that would answer 403).
 *
 * To add a page: append one record to `consoleRoutes` with a lazy `component` import and
 * `meta: { title, icon, roles }`.
 */
import type { RouteRecordRaw } from 'vue-router';
import type { Role } from '../api/types.js';

declare module 'vue-router' {
  interface RouteMeta {
    /** Shown in the drawer, the app bar and the document title. */
    title?: string;
    /** An mdi-* icon name for the drawer. */
    icon?: string;
    /** Who may open the page; absent = everyone signed in. */
    roles?: Role[];
    /** Reachable without a session (sign-in, invitation, password reset). */
    public?: boolean;
    /** Hidden from the drawer (detail pages, the no-access page). */
    hidden?: boolean;
  }
}

export type ConsoleRoute = RouteRecordRaw & {
  name: string;
  meta: { title: string; icon: string; roles: Role[]; hidden?: boolean };
};

const ALL: Role[] = ['admin', 'billing', 'developer'];

export const consoleRoutes: ConsoleRoute[] = [
  {
    path: '',
    name: 'overview',
    component: () => import('../views/OverviewView.vue'),
    meta: { title: 'Overview', icon: 'mdi-gauge', roles: ALL },
  },
  {
    path: 'accounts',
    name: 'accounts',
    component: () => import('../views/AccountsView.vue'),
    meta: { title: 'Accounts', icon: 'mdi-domain', roles: ['admin', 'billing'] },
  },
  {
    path: 'keys',
    name: 'keys',
    component: () => import('../views/KeysView.vue'),
    meta: { title: 'API keys', icon: 'mdi-key-chain-variant', roles: ALL },
  },
  // ---- request log, usage, billing and liquor library pages: append their records below ----
  {
    path: 'request-log',
    name: 'request-log',
    component: () => import('../views/RequestLogView.vue'),
    meta: { title: 'Request log', icon: 'mdi-text-box-search-outline', roles: ALL },
  },
  {
    path: 'usage',
    name: 'usage',
    component: () => import('../views/UsageView.vue'),
    meta: { title: 'Usage', icon: 'mdi-chart-bar', roles: ALL },
  },
  {
    path: 'billing',
    name: 'billing',
    component: () => import('../views/BillingView.vue'),
    meta: { title: 'Billing', icon: 'mdi-receipt-text-outline', roles: ['admin', 'billing'] },
  },
  {
    path: 'liquors',
    name: 'liquors',
    component: () => import('../views/LiquorLibraryView.vue'),
    meta: { title: 'Liquor library', icon: 'mdi-flask-round-bottom-outline', roles: ['admin', 'billing'] },
  },
  {
    path: 'workbench',
    name: 'workbench',
    component: () => import('../views/WorkbenchView.vue'),
    meta: { title: 'Workbench', icon: 'mdi-calculator-variant-outline', roles: ['admin', 'developer'] },
  },
  // ---- (end of the appended pages) ----
  {
    path: 'users',
    name: 'users',
    component: () => import('../views/UsersView.vue'),
    meta: { title: 'People', icon: 'mdi-account-group-outline', roles: ['admin'] },
  },
  {
    path: 'audit',
    name: 'audit',
    component: () => import('../views/AuditLogView.vue'),
    meta: { title: 'Audit trail', icon: 'mdi-clipboard-text-clock-outline', roles: ['admin'] },
  },
  {
    path: 'outbox',
    name: 'outbox',
    component: () => import('../views/OutboxView.vue'),
    meta: { title: 'Outbox', icon: 'mdi-email-fast-outline', roles: ['admin'] },
  },
  {
    path: 'no-access',
    name: 'no-access',
    component: () => import('../views/NoAccessView.vue'),
    meta: { title: 'No access', icon: 'mdi-lock-outline', roles: ALL, hidden: true },
  },
];

/** Pages outside the layout, reachable without a session. */
export const publicRoutes: RouteRecordRaw[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('../views/SignInView.vue'),
    meta: { title: 'Sign in', public: true },
  },
  {
    path: '/accept-invitation',
    name: 'accept-invitation',
    component: () => import('../views/AcceptInvitationView.vue'),
    meta: { title: 'Accept invitation', public: true },
  },
  {
    path: '/reset-password',
    name: 'reset-password',
    component: () => import('../views/ResetPasswordView.vue'),
    meta: { title: 'Reset password', public: true },
  },
];

/** The drawer's entries for a role, in order. */
export function navFor(role: Role | null): ConsoleRoute[] {
  if (role === null) return [];
  return consoleRoutes.filter((r) => !r.meta.hidden && r.meta.roles.includes(role));
}
