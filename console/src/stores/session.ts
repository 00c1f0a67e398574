/**
 * The console session (Pinia setup store): who is signed in, with which role and accounts.
 * The session itself is a pair of HTTP-only cookies set by the server; this store only mirrors
 * GET /console-api/auth/me and drives sign-in, sign-out and refresh.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { api as defaultApi, ApiProblem, asProblem, type ApiClient } from '../api/client.js';
import { unwrapUser, type ConsoleUser, type Role } from '../api/types.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useSessionClient(next: ApiClient): void {
  client = next;
}

/**
 * Remembers in this browser that someone was signed in, so that a refused refresh can be told
 * apart from a first visit: only the former is "your session ended". It holds no secret (the
 * session is in HTTP-only cookies); it is cleared on sign-out and once the end has been said.
 */
export const HAD_SESSION_KEY = 'ebullio.console.hadSession';

function storage(): Storage | undefined {
  try {
    return typeof localStorage === 'undefined' ? undefined : localStorage;
  } catch {
    return undefined; // storage blocked by the browser's settings
  }
}

function rememberSession(present: boolean): void {
  const store = storage();
  if (!store) return;
  if (present) store.setItem(HAD_SESSION_KEY, '1');
  else store.removeItem(HAD_SESSION_KEY);
}

export const useSessionStore = defineStore('session', () => {
  const user = ref<ConsoleUser | null>(null);
  /** True when a session this browser had could not be renewed (not on a first visit). */
  const ended = ref(false);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);
  /** True once GET /auth/me has answered (signed in or not). */
  const loaded = ref(false);

  const role = computed<Role | null>(() => user.value?.role ?? null);
  const signedIn = computed(() => user.value !== null);

  function can(roles: readonly Role[] | undefined): boolean {
    if (!roles || roles.length === 0) return true;
    return role.value !== null && roles.includes(role.value);
  }

  /** Loads the current user; 401 (after the client's one refresh attempt) means signed out. */
  async function load(force = false): Promise<ConsoleUser | null> {
    if (loaded.value && !force) return user.value;
    loading.value = true;
    try {
      user.value = unwrapUser(await client.get<unknown>('/auth/me'));
      error.value = null;
      if (user.value) rememberSession(true);
    } catch (err) {
      user.value = null;
      if (!(err instanceof ApiProblem && err.status === 401)) error.value = asProblem(err);
    } finally {
      loaded.value = true;
      loading.value = false;
    }
    return user.value;
  }

  async function signIn(email: string, password: string): Promise<boolean> {
    loading.value = true;
    error.value = null;
    try {
      const body = await client.post<unknown>('/auth/sign-in', { email, password });
      user.value = unwrapUser(body) ?? unwrapUser(await client.get<unknown>('/auth/me'));
      loaded.value = true;
      ended.value = false;
      rememberSession(user.value !== null);
      return user.value !== null;
    } catch (err) {
      user.value = null;
      error.value = asProblem(err);
      return false;
    } finally {
      loading.value = false;
    }
  }

  async function signOut(): Promise<void> {
    loading.value = true;
    try {
      await client.post('/auth/sign-out');
    } catch {
      // the session is dropped locally either way
    } finally {
      user.value = null;
      loaded.value = true;
      loading.value = false;
      rememberSession(false);
    }
  }

  /** Renews the session cookies; on failure the user is signed out locally. */
  async function refresh(): Promise<boolean> {
    const ok = await client.refreshSession();
    if (!ok) {
      user.value = null;
      return false;
    }
    await load(true);
    return user.value !== null;
  }

  /**
   * Called by the client when a 401 could not be cured: forget the user. The session "ended" only
   * when there was one (signed in on this page, or remembered from an earlier visit); a first
   * visitor's 401 is just "not signed in". Returns whether a session ended.
   */
  function expire(): boolean {
    const had = user.value !== null || storage()?.getItem(HAD_SESSION_KEY) === '1';
    user.value = null;
    loaded.value = true;
    rememberSession(false);
    if (had) ended.value = true;
    return had;
  }

  return {
    user,
    role,
    loading,
    error,
    loaded,
    ended,
    signedIn,
    can,
    load,
    signIn,
    signOut,
    refresh,
    expire,
  };
});
