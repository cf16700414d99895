import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { authApi } from '../api/auth';
import { useTokenSource } from '../api/http';
import type { SessionAnswer, User } from '../../shared/schemas/user';

/** The signed-in account and its access token (kept in memory; the refresh token is an HttpOnly cookie). */
export const useSessionStore = defineStore('session', () => {
  const user = ref<User | null>(null);
  const accessToken = ref<string | null>(null);
  const restored = ref(false);
  let renewing: Promise<boolean> | null = null;

  const signedIn = computed(() => user.value !== null);
  const isAdmin = computed(() => user.value?.role === 'admin');

  function accept(answer: SessionAnswer): void {
    user.value = answer.user;
    accessToken.value = answer.accessToken;
  }

  /** Renews the access token from the refresh cookie (one request at a time). */
  function renew(): Promise<boolean> {
    const before = accessToken.value;
    renewing ??= authApi
      .refresh()
      .then((a) => {
        accept(a);
        return true;
      })
      .catch(() => {
        // A sign-in that finished meanwhile (public pages restore in the background) keeps its tokens.
        if (accessToken.value !== before) return true;
        user.value = null;
        accessToken.value = null;
        return false;
      })
      .finally(() => {
        renewing = null;
      });
    return renewing;
  }

  useTokenSource({ token: () => accessToken.value, renew });

  /** On page load: picks up a session from the refresh cookie, once. */
  async function restore(): Promise<void> {
    if (restored.value) return;
    await renew();
    restored.value = true;
  }

  /** Signs in with e-mail and password. */
  async function signIn(email: string, password: string): Promise<void> {
    accept(await authApi.signIn({ email, password }));
    restored.value = true;
  }

  /** Signs up (when sign-up is open). */
  async function signUp(name: string, email: string, password: string): Promise<void> {
    accept(await authApi.signUp({ name, email, password }));
    restored.value = true;
  }

  /** Changes the password; the new tokens replace the old ones. */
  async function changePassword(currentPassword: string, newPassword: string): Promise<void> {
    accept(await authApi.changePassword({ currentPassword, newPassword }));
  }

  /** Signs out everywhere. */
  async function signOut(): Promise<void> {
    await authApi.signOut().catch(() => undefined);
    user.value = null;
    accessToken.value = null;
  }

  return { user, accessToken, signedIn, isAdmin, restore, signIn, signUp, changePassword, signOut, renew };
});
