// @vitest-environment happy-dom
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { getMe, requestSignInLink, signOut, verifySignInLink } from '@/api/auth'
import { ApiError, request } from '@/api/http'
import { installGuards, routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import { useNotificationsStore } from '@/stores/notifications'
import { customerPrincipal, staffPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))

const owner = staffPrincipal('owner')
const technician = staffPrincipal('technician')
const linkInvalid = new ApiError(400, 'link_invalid', 'This sign-in link has expired or has already been used.')
const unreachable = new ApiError(0, 'network_error', 'The server cannot be reached. Check the connection and try again.')

beforeEach(() => {
  setActivePinia(createPinia())
  vi.mocked(getMe).mockReset()
  vi.mocked(requestSignInLink).mockReset()
  vi.mocked(verifySignInLink).mockReset()
  vi.mocked(signOut).mockReset()
  localStorage.clear()
})

afterEach(() => {
  vi.useRealTimers()
  vi.unstubAllGlobals()
})

describe('loading who is signed in', () => {
  it('asks the server once, however many callers wait for the answer', async () => {
    vi.mocked(getMe).mockResolvedValue(owner)
    const auth = useAuthStore()

    const first = auth.load()
    expect(auth.isLoading).toBe(true)
    await Promise.all([first, auth.load()])
    await auth.load()

    expect(getMe).toHaveBeenCalledOnce()
    expect(auth.isLoading).toBe(false)
    expect(auth.hasLoaded).toBe(true)
    expect(auth.staff).toEqual(owner)
    expect(auth.customer).toBeNull()
  })

  it('knows a signed-out visitor from a failed check', async () => {
    vi.mocked(getMe).mockResolvedValue(null)
    const auth = useAuthStore()

    await auth.load()

    expect(auth.user).toBeNull()
    expect(auth.hasLoaded).toBe(true)
    expect(auth.error).toBeNull()
  })

  it('on failure keeps the error, tells the person, and asks again next time', async () => {
    vi.mocked(getMe).mockRejectedValueOnce(unreachable).mockResolvedValue(owner)
    const auth = useAuthStore()

    await auth.load()
    expect(auth.hasLoaded).toBe(false)
    expect(auth.error).toBe(unreachable)
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: unreachable.message }])

    await auth.load()
    expect(auth.staff?.id).toBe(owner.id)
    expect(auth.error).toBeNull()
  })

  it("answers can() from the signed-in member's role, and no for customers or nobody", async () => {
    const auth = useAuthStore()
    vi.mocked(getMe).mockResolvedValue(technician)
    await auth.load()

    expect(auth.can('inspections:write')).toBe(true)
    expect(auth.can('staff:manage')).toBe(false)

    vi.mocked(getMe).mockResolvedValue(customerPrincipal)
    await auth.refresh()
    expect(auth.can('workshop:read')).toBe(false)

    vi.mocked(getMe).mockResolvedValue(null)
    await auth.refresh()
    expect(auth.can('workshop:read')).toBe(false)
  })
})

describe('sign-in links', () => {
  it('asks for a staff or customer link for the address', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    const auth = useAuthStore()

    const asking = auth.requestLink('customer', 'juno@example.test')
    expect(auth.isSending).toBe(true)

    await expect(asking).resolves.toBe(true)
    expect(requestSignInLink).toHaveBeenCalledWith('customer', 'juno@example.test')
    expect(auth.isSending).toBe(false)
  })

  it('keeps a 422 or 429 for the form to show, without a second message in the notification queue', async () => {
    const tooMany = new ApiError(429, 'too_many_requests', 'Too many attempts. Please wait a few minutes and try again.')
    vi.mocked(requestSignInLink).mockRejectedValue(tooMany)
    const auth = useAuthStore()

    await expect(auth.requestLink('staff', 'wren@hollowmere.test')).resolves.toBe(false)

    expect(auth.error).toBe(tooMany)
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('remembers where the person was going, for the same kind of sign-in only, once', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    const auth = useAuthStore()
    await auth.requestLink('staff', 'wren@hollowmere.test', '/team?x=1')

    expect(auth.takeRedirect('customer')).toBeNull()

    await auth.requestLink('staff', 'wren@hollowmere.test', '/team?x=1')
    expect(auth.takeRedirect('staff')).toBe('/team?x=1')
    expect(auth.takeRedirect('staff')).toBeNull()
  })

  it('never remembers a way out of the app', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    const auth = useAuthStore()

    for (const path of ['//elsewhere.test/x', '/\\elsewhere.test', 'https://elsewhere.test/']) {
      await auth.requestLink('staff', 'wren@hollowmere.test', path)
      expect(auth.takeRedirect('staff')).toBeNull()
    }
  })

  it('forgets the destination after half an hour, well after the link itself has run out', async () => {
    vi.useFakeTimers({ toFake: ['Date'] })
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    const auth = useAuthStore()
    await auth.requestLink('staff', 'wren@hollowmere.test', '/activity')

    vi.advanceTimersByTime(31 * 60 * 1000)

    expect(auth.takeRedirect('staff')).toBeNull()
  })

  it('signs in with a good link', async () => {
    vi.mocked(verifySignInLink).mockResolvedValue(owner)
    const auth = useAuthStore()

    await expect(auth.verify('t'.repeat(40))).resolves.toEqual(owner)

    expect(verifySignInLink).toHaveBeenCalledWith('t'.repeat(40))
    expect(auth.staff).toEqual(owner)
    expect(auth.hasLoaded).toBe(true)
  })

  it('reports a used or expired link to the page, not as an alarm', async () => {
    vi.mocked(verifySignInLink).mockRejectedValue(linkInvalid)
    const auth = useAuthStore()

    await expect(auth.verify('t'.repeat(40))).resolves.toBeNull()

    expect(auth.user).toBeNull()
    expect(auth.error?.code).toBe('link_invalid')
    expect(useNotificationsStore().queue).toEqual([])
  })
})

describe('signing out', () => {
  it('forgets the person once the server has ended the session', async () => {
    vi.mocked(getMe).mockResolvedValue(owner)
    vi.mocked(signOut).mockResolvedValue(undefined)
    const auth = useAuthStore()
    await auth.load()

    await expect(auth.signOut()).resolves.toBe(true)

    expect(signOut).toHaveBeenCalledOnce()
    expect(auth.user).toBeNull()
  })

  it('counts a session that had already ended as signed out', async () => {
    vi.mocked(getMe).mockResolvedValue(owner)
    vi.mocked(signOut).mockRejectedValue(new ApiError(401, 'unauthorized', 'Please sign in'))
    const auth = useAuthStore()
    await auth.load()

    await expect(auth.signOut()).resolves.toBe(true)
    expect(auth.user).toBeNull()
  })

  it('stays signed in, and says so, when the server cannot be reached', async () => {
    vi.mocked(getMe).mockResolvedValue(owner)
    vi.mocked(signOut).mockRejectedValue(unreachable)
    const auth = useAuthStore()
    await auth.load()

    await expect(auth.signOut()).resolves.toBe(false)
    expect(auth.staff).toEqual(owner)
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: unreachable.message }])
  })
})

describe('a 401 from any request', () => {
  beforeAll(() => preloadRouteComponents())

  function jsonResponse(status: number, body: unknown): Response {
    return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } })
  }

  async function signedInAt(path: string, who: typeof owner | typeof customerPrincipal) {
    vi.mocked(getMe).mockResolvedValue(who)
    const router = createRouter({ history: createMemoryHistory(), routes })
    installGuards(router)
    await router.push(path)
    return router
  }

  async function sessionEnds() {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => jsonResponse(401, { error: { code: 'unauthorized', message: 'Please sign in' } })),
    )
    await request('GET', '/staff').catch(() => undefined)
    await vi.waitFor(() => expect(useAuthStore().user).toBeNull())
  }

  it('sends staff to sign in, keeping the page they were on', async () => {
    const router = await signedInAt('/team?from=menu', owner)
    expect(router.currentRoute.value.name).toBe('team')

    await sessionEnds()

    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('sign-in'))
    expect(router.currentRoute.value.query.redirect).toBe('/team?from=menu')
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'info', text: expect.stringMatching(/signed out/) }])
  })

  it('sends customers to the portal sign-in', async () => {
    const router = await signedInAt('/portal/account', customerPrincipal)

    await sessionEnds()

    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('portal-sign-in'))
    expect(router.currentRoute.value.query.redirect).toBe('/portal/account')
  })
})
