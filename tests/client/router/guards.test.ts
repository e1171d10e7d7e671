// @vitest-environment happy-dom
import { createPinia, setActivePinia } from 'pinia'
import { beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { getMe } from '@/api/auth'
import { installGuards, routes } from '@/router'
import { useNotificationsStore } from '@/stores/notifications'
import type { Principal } from '@shared/schemas/auth'
import { customerPrincipal, staffPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))

/** A fresh page load: a new store that has not yet asked who is signed in. */
async function visit(path: string, who: Principal | null) {
  setActivePinia(createPinia())
  vi.mocked(getMe).mockResolvedValue(who)
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  await router.push(path)
  return router.currentRoute.value
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.mocked(getMe).mockReset()
})

describe('staff pages', () => {
  it('send someone not signed in to sign in, remembering the page', async () => {
    const route = await visit('/activity?action=sign_out', null)

    expect(route.name).toBe('sign-in')
    expect(route.query.redirect).toBe('/activity?action=sign_out')
  })

  it('cover pages added later under the staff area too', async () => {
    const route = await visit('/', null)

    expect(route.name).toBe('sign-in')
  })

  it('let an owner into the team page', async () => {
    const route = await visit('/team', staffPrincipal('owner'))

    expect(route.name).toBe('team')
  })

  it("turn a technician away from the team page, home, saying it isn't for their role", async () => {
    const route = await visit('/team', staffPrincipal('technician'))

    expect(route.name).toBe('staff-home')
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'info', text: 'Team is not available for your role (Technician).' }])
  })

  it('keep the activity log to owners', async () => {
    expect((await visit('/activity', staffPrincipal('advisor'))).name).toBe('staff-home')
    expect((await visit('/activity', staffPrincipal('owner'))).name).toBe('activity')
  })

  it('let every role read the workshop settings', async () => {
    for (const role of ['owner', 'advisor', 'technician'] as const) {
      expect((await visit('/settings', staffPrincipal(role))).name).toBe('settings')
    }
  })

  it('keep a signed-in customer out, sending them to their own account', async () => {
    const route = await visit('/team', customerPrincipal)

    expect(route.name).toBe('portal-account')
  })
})

describe('portal account', () => {
  it('is for the signed-in customer', async () => {
    expect((await visit('/portal/account', customerPrincipal)).name).toBe('portal-account')
  })

  it('sends anyone else to the portal sign-in, remembering the page', async () => {
    for (const who of [null, staffPrincipal('owner')]) {
      const route = await visit('/portal/account', who)
      expect(route.name).toBe('portal-sign-in')
      expect(route.query.redirect).toBe('/portal/account')
    }
  })
})

describe('sign-in pages', () => {
  it('are open to anyone signed out', async () => {
    expect((await visit('/sign-in', null)).name).toBe('sign-in')
    expect((await visit('/portal/sign-in', null)).name).toBe('portal-sign-in')
  })

  it('send someone already signed in that way on to where they belong', async () => {
    expect((await visit('/sign-in', staffPrincipal('advisor'))).name).toBe('staff-home')
    expect((await visit('/portal/sign-in', customerPrincipal)).name).toBe('portal-account')
  })

  it('let a customer ask for a staff link and the other way round', async () => {
    expect((await visit('/sign-in', customerPrincipal)).name).toBe('sign-in')
    expect((await visit('/portal/sign-in', staffPrincipal('owner'))).name).toBe('portal-sign-in')
  })

  it('never ask the server who is signed in before following a link', async () => {
    await visit('/sign-in/link?token=abc', null)

    expect(getMe).not.toHaveBeenCalled()
  })
})

describe('public pages', () => {
  it('need nobody signed in', async () => {
    expect((await visit('/portal', null)).name).toBe('portal-welcome')
    expect((await visit('/no/such/page', null)).name).toBe('not-found')
    expect(getMe).not.toHaveBeenCalled()
  })
})
