import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { CurrentUser, LoginRequest, Role } from '../../shared/schemas/auth'
import * as authApi from '@/api/auth'
import { ApiError, asApiError } from '@/api/http'
import { rolesOf } from '../../shared/access'
import { hasAnyRole } from '@/router/access'

/**
 * Who is signed in. `loaded` becomes true after the first answer from /auth/session so the router
 * waits for it once; errors are kept per action so each screen shows the one that concerns it.
 */
export const useSessionStore = defineStore('session', () => {
  const user = ref<CurrentUser | null>(null)
  const loaded = ref(false)
  const loadError = ref<ApiError | null>(null)
  const signInError = ref<ApiError | null>(null)
  const signOutError = ref<ApiError | null>(null)
  const signingIn = ref(false)
  const signingOut = ref(false)

  const isSignedIn = computed(() => user.value !== null)
  const isAdmin = computed(() => user.value?.isAdmin === true)
  const roles = computed(() => rolesOf(user.value))

  function hasRole(...wanted: Role[]): boolean {
    return hasAnyRole(user.value, wanted)
  }

  /** Asks the server who we are. A 401 simply means "nobody"; anything else is kept as an error. */
  async function load(): Promise<void> {
    loadError.value = null
    try {
      user.value = await authApi.fetchCurrentUser()
    } catch (error) {
      const apiError = asApiError(error)
      user.value = null
      if (apiError.status !== 401) loadError.value = apiError
    } finally {
      loaded.value = true
    }
  }

  async function ensureLoaded(): Promise<void> {
    if (!loaded.value) await load()
  }

  async function signIn(credentials: LoginRequest): Promise<boolean> {
    signingIn.value = true
    signInError.value = null
    try {
      user.value = await authApi.login(credentials)
      loadError.value = null
      loaded.value = true
      return true
    } catch (error) {
      signInError.value = asApiError(error)
      return false
    } finally {
      signingIn.value = false
    }
  }

  async function signOut(): Promise<boolean> {
    signingOut.value = true
    signOutError.value = null
    try {
      await authApi.logout()
      forget()
      return true
    } catch (error) {
      const apiError = asApiError(error)
      // An expired session is already signed out as far as the user is concerned.
      if (apiError.status === 401) {
        forget()
        return true
      }
      signOutError.value = apiError
      return false
    } finally {
      signingOut.value = false
    }
  }

  /** Drops the local copy of the user (after sign-out, or when the server says the session ended). */
  function forget(): void {
    user.value = null
    signOutError.value = null
    loaded.value = true
  }

  return {
    user,
    loaded,
    loadError,
    signInError,
    signOutError,
    signingIn,
    signingOut,
    isSignedIn,
    isAdmin,
    roles,
    hasRole,
    load,
    ensureLoaded,
    signIn,
    signOut,
    forget,
  }
})
