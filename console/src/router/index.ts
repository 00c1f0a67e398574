/**
 * The console router: web history under /console/. The guard loads the session once, sends
 * visitors without one to the sign-in page (remembering where they were going), and turns a page
 * the role may not use into the no-access page.
 */
import { createRouter, createWebHistory, type Router, type RouterHistory } from 'vue-router';
import { api } from '../api/client.js';
import { useSessionStore } from '../stores/session.js';
import { consoleRoutes, publicRoutes } from './routes.js';

export const CONSOLE_BASE = '/console/';

export function createConsoleRouter(history: RouterHistory = createWebHistory(CONSOLE_BASE)): Router {
  const router = createRouter({
    history,
    routes: [
      ...publicRoutes,
      {
        path: '/',
        component: () => import('../layouts/ConsoleLayout.vue'),
        children: consoleRoutes,
      },
      { path: '/:pathMatch(.*)*', name: 'not-found', component: () => import('../views/NotFoundView.vue') },
    ],
    scrollBehavior: () => ({ top: 0 }),
  });

  router.beforeEach(async (to) => {
    const session = useSessionStore();
    if (to.meta.public) {
      if (to.name === 'sign-in' && (await session.load()) !== null) return { name: 'overview' };
      return true;
    }
    const user = await session.load();
    if (!user) {
      const query: Record<string, string> = to.fullPath !== '/' ? { next: to.fullPath } : {};
      if (session.ended) query.expired = '1';
      return { name: 'sign-in', query };
    }
    if (to.name !== 'not-found' && !session.can(to.meta.roles)) {
      return { name: 'no-access', query: { page: String(to.meta.title ?? to.path) } };
    }
    return true;
  });

  router.afterEach((to) => {
    if (typeof document !== 'undefined') {
      document.title = to.meta.title ? `${to.meta.title} · Ebullio console` : 'Ebullio console';
    }
  });

  // A session that ends mid-use (refresh refused) sends the user back to sign in. Before the first
  // navigation has finished (no page matched yet) the guard does that itself, keeping the target;
  // on a public page (the sign-in form itself) nothing moves, so typed fields stay.
  api.setSessionExpiredHandler(() => {
    const ended = useSessionStore().expire();
    const current = router.currentRoute.value;
    if (ended && current.matched.length > 0 && !current.meta.public) {
      void router.replace({ name: 'sign-in', query: { next: current.fullPath, expired: '1' } });
    }
  });

  return router;
}

export const router = createConsoleRouter();
