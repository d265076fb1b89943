import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { Me } from '../../shared/api-types';
import type { SignInBody } from '../../shared/schemas/auth';
import * as authApi from '../api/auth';
import { ApiError, handleSignedOut } from '../api/http';

/** Who is signed in. Loaded once per page load; cleared when the server says the session ended. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<Me | null>(null);
  const loaded = ref(false);
  const signedIn = computed(() => user.value !== null);

  handleSignedOut(() => {
    user.value = null;
  });

  async function load(): Promise<void> {
    if (loaded.value) return;
    try {
      user.value = await authApi.fetchMe();
    } catch (error) {
      if (!(error instanceof ApiError) || error.status !== 401) throw error;
      user.value = null;
    }
    loaded.value = true;
  }

  async function signIn(body: SignInBody): Promise<void> {
    user.value = await authApi.signIn(body);
    loaded.value = true;
  }

  async function signOut(): Promise<void> {
    await authApi.signOut();
    user.value = null;
  }

  return { user, loaded, signedIn, load, signIn, signOut };
});
