import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { Router } from 'vue-router'
import * as authApi from '@/api/auth'
import type { Audience } from '@/api/auth'
import { type ApiError, onUnauthorized } from '@/api/http'
import { can as roleCan, type Permission } from '@shared/auth/policy'
import type { CustomerPrincipal, Principal, StaffPrincipal } from '@shared/schemas/auth'
import { useNotificationsStore } from './notifications'
import { asApiError, reportFailure } from './report-failure'

export type { Audience }

/**
 * The page someone was heading for travels through their e-mail app, which drops it: the link the
 * server sends carries only the token. It is kept on this device instead, for a little longer
 * than the link itself lives.
 */
const REDIRECT_KEY = 'tickover.sign-in.redirect'
const REDIRECT_LIFETIME_MS = 30 * 60 * 1000

interface StoredRedirect {
  audience: Audience
  path: string
  savedAt: number
}

/** Only a path inside this app: `//host` and `/\host` would leave it. */
export function isAppPath(path: unknown): path is string {
  return typeof path === 'string' && path.startsWith('/') && !path.startsWith('//') && !path.startsWith('/\\')
}

// Private browsing can make storage throw; losing the redirect only means landing on the home page.
function writeRedirect(value: StoredRedirect | null): void {
  try {
    if (value) localStorage.setItem(REDIRECT_KEY, JSON.stringify(value))
    else localStorage.removeItem(REDIRECT_KEY)
  } catch {
    // Nothing else to do: see above.
  }
}

function readRedirect(): StoredRedirect | null {
  try {
    const raw = localStorage.getItem(REDIRECT_KEY)
    return raw ? (JSON.parse(raw) as StoredRedirect) : null
  } catch {
    return null
  }
}

export const useAuthStore = defineStore('auth', () => {
  const user = ref<Principal | null>(null)
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  const isSending = ref(false)
  const error = ref<ApiError | null>(null)
  let pendingLoad: Promise<void> | null = null
  let signingOut = false

  const staff = computed<StaffPrincipal | null>(() => (user.value?.kind === 'staff' ? user.value : null))
  const customer = computed<CustomerPrincipal | null>(() => (user.value?.kind === 'customer' ? user.value : null))

  function can(permission: Permission): boolean {
    return roleCan(staff.value?.role, permission)
  }

  async function fetchMe(): Promise<void> {
    isLoading.value = true
    error.value = null
    try {
      user.value = await authApi.getMe()
      hasLoaded.value = true
    } catch (cause) {
      error.value = reportFailure(cause)
    } finally {
      isLoading.value = false
    }
  }

  /** Asks the server who is signed in, once; every guard awaits the same answer. A failure is asked again next time. */
  function load(): Promise<void> {
    if (hasLoaded.value) return Promise.resolve()
    pendingLoad ??= fetchMe().finally(() => {
      pendingLoad = null
    })
    return pendingLoad
  }

  /** After a change that alters the principal (own role, workshop name). */
  function refresh(): Promise<void> {
    hasLoaded.value = false
    return load()
  }

  async function requestLink(audience: Audience, email: string, redirect?: string): Promise<boolean> {
    isSending.value = true
    error.value = null
    try {
      await authApi.requestSignInLink(audience, email)
      writeRedirect(isAppPath(redirect) ? { audience, path: redirect, savedAt: Date.now() } : null)
      return true
    } catch (cause) {
      error.value = reportFailure(cause)
      return false
    } finally {
      isSending.value = false
    }
  }

  /** The link page shows every failure itself (an expired link is an ordinary event, not an alarm). */
  async function verify(token: string): Promise<Principal | null> {
    isLoading.value = true
    error.value = null
    try {
      user.value = await authApi.verifySignInLink(token)
      hasLoaded.value = true
      return user.value
    } catch (cause) {
      error.value = asApiError(cause)
      return null
    } finally {
      isLoading.value = false
    }
  }

  /** Where the person was going before they asked for the link, if it was this kind of sign-in and recent. */
  function takeRedirect(audience: Audience): string | null {
    const stored = readRedirect()
    writeRedirect(null)
    if (!stored || stored.audience !== audience || !isAppPath(stored.path)) return null
    return Date.now() - stored.savedAt < REDIRECT_LIFETIME_MS ? stored.path : null
  }

  async function signOut(): Promise<boolean> {
    signingOut = true
    error.value = null
    try {
      await authApi.signOut()
    } catch (cause) {
      const failure = asApiError(cause)
      // 401: the session had already ended, which is what signing out wanted.
      if (failure.status !== 401) {
        error.value = reportFailure(failure)
        return false
      }
    } finally {
      signingOut = false
    }
    user.value = null
    hasLoaded.value = true
    return true
  }

  /** A request came back 401: the session ended elsewhere (timed out, deactivated, signed out in another tab). */
  function sessionEnded(router: Router): void {
    if (signingOut) return
    const here = router.currentRoute.value
    const wasCustomer = user.value?.kind === 'customer' || (user.value === null && here.path.startsWith('/portal'))
    user.value = null
    hasLoaded.value = true
    if (here.meta.signIn) return
    useNotificationsStore().push('info', 'You have been signed out. Please sign in again to carry on.')
    void router.push({ name: wasCustomer ? 'portal-sign-in' : 'sign-in', query: { redirect: here.fullPath } })
  }

  return {
    user,
    staff,
    customer,
    hasLoaded,
    isLoading,
    isSending,
    error,
    can,
    load,
    refresh,
    requestLink,
    verify,
    takeRedirect,
    signOut,
    sessionEnded,
  }
})

/** The one place that reacts to a 401; returns the function that stops listening. */
export function sendToSignInOnUnauthorized(router: Router): () => void {
  return onUnauthorized(() => useAuthStore().sessionEnded(router))
}
