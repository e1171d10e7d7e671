import { computed, onMounted, ref } from 'vue'
import { type RouteLocationRaw, useRoute, useRouter } from 'vue-router'
import type { LinkState } from '@/components/auth/SignInLinkStatus.vue'
import { type Audience, useAuthStore } from '@/stores/auth'

/**
 * What a sign-in link page does: takes the token out of the address bar (and so out of the history
 * and anything that reads the URL later), trades it for a session, then carries on to where the
 * person was going.
 */
export function useSignInLink(audience: Audience, home: RouteLocationRaw) {
  const route = useRoute()
  const router = useRouter()
  const auth = useAuthStore()

  const raw = route.query.token
  const token = typeof raw === 'string' && raw !== '' ? raw : null
  const state = ref<LinkState>(token ? 'checking' : 'incomplete')
  const message = ref<string | null>(null)

  async function check(): Promise<void> {
    if (!token) return
    state.value = 'checking'
    message.value = null
    if (await auth.verify(token)) {
      await router.replace(auth.takeRedirect(audience) ?? home)
      return
    }
    const failure = auth.error
    if (failure?.code === 'link_invalid') state.value = 'invalid'
    else if (failure?.status === 422) state.value = 'incomplete'
    else {
      state.value = 'failed'
      message.value = failure?.message ?? null
    }
  }

  onMounted(async () => {
    if ('token' in route.query) {
      const { token: _token, ...rest } = route.query
      await router.replace({ path: route.path, query: rest, hash: route.hash })
    }
    await check()
  })

  return { state, message, retry: check }
}

/** What a page asking for a sign-in link does: send it, remember where to, and allow a resend. */
export function useSignInRequest(audience: Audience) {
  const route = useRoute()
  const auth = useAuthStore()
  const redirect = computed(() => (typeof route.query.redirect === 'string' ? route.query.redirect : undefined))

  const sentTo = ref<string | null>(null)
  const sendCount = ref(0)

  async function send(email: string): Promise<void> {
    if (!(await auth.requestLink(audience, email, redirect.value))) return
    sendCount.value = sentTo.value === email ? sendCount.value + 1 : 1
    sentTo.value = email
  }

  function restart(): void {
    sentTo.value = null
  }

  return { sentTo, sendCount, send, restart }
}
