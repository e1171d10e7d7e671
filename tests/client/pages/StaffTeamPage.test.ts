// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { changeStaffRole, deactivateStaff, inviteStaff, listStaff, reactivateStaff } from '@/api/staff'
import AppNotifications from '@/components/app/AppNotifications.vue'
import StaffTeamPage from '@/pages/staff/StaffTeamPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import type { StaffMember } from '@shared/schemas/staff'
import {
  alertsIn,
  buttonByName,
  chooseOption,
  fieldByLabel,
  fieldMessages,
  openDialog,
  queryButtonByName,
  statusMessages,
  typeInto,
} from '../support/dom'
import { staffPrincipal } from '../support/principals'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/staff', () => ({
  listStaff: vi.fn(),
  inviteStaff: vi.fn(),
  changeStaffRole: vi.fn(),
  deactivateStaff: vi.fn(),
  reactivateStaff: vi.fn(),
}))

const owner = staffPrincipal('owner')

function member(role: StaffMember['role'], overrides: Partial<StaffMember> = {}): StaffMember {
  const p = staffPrincipal(role)
  return {
    id: p.id,
    name: p.name,
    email: p.email,
    role,
    active: true,
    lastSignInAt: null,
    createdAt: '2025-01-06T09:00:00.000Z',
    ...overrides,
  }
}

const team: StaffMember[] = [
  member('advisor', { lastSignInAt: '2025-07-01T12:00:00.000Z' }),
  member('owner', { lastSignInAt: '2025-01-15T08:30:00.000Z' }),
  member('technician', { active: false }),
]

let unmount: (() => void) | undefined

async function mountPage() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = owner
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'team' })
  // The page inside an app shell, as in the app, so dialogs and notifications have somewhere to go.
  const Host = defineComponent(() => () => h(VApp, () => [h(StaffTeamPage), h(AppNotifications)]))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router }
}

function cardOf(name: string): HTMLElement {
  const heading = [...document.querySelectorAll('h2')].find((h) => h.textContent?.startsWith(name))
  const card = heading?.closest('li')
  if (!card) throw new Error(`No card for ${name}`)
  return card
}

function factsOf(name: string): Record<string, string> {
  const card = cardOf(name)
  const dts = [...card.querySelectorAll('dt')]
  return Object.fromEntries(dts.map((dt) => [dt.textContent?.trim() ?? '', dt.nextElementSibling?.textContent?.trim() ?? '']))
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  for (const fn of [listStaff, inviteStaff, changeStaffRole, deactivateStaff, reactivateStaff, getMe]) vi.mocked(fn).mockReset()
  vi.mocked(listStaff).mockResolvedValue(team)
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
})

describe('team page', () => {
  it('lists everyone with e-mail, role, whether they can sign in, and when they last did', async () => {
    await mountPage()

    expect(document.querySelector('h1')?.textContent).toBe('Team')
    expect([...document.querySelectorAll('li h2')].map((h) => h.textContent?.trim())).toEqual([
      'Ola Brandt',
      'Wren Castell (you)',
      'Pim Sayer',
    ])
    expect(cardOf('Ola Brandt').textContent).toContain('advisor@hollowmere.test')
    // 12:00 UTC on 1 July is 13:00 in London (British Summer Time, UTC+1).
    expect(factsOf('Ola Brandt')).toEqual({ Access: 'Active', 'Last signed in': '1 Jul 2025, 13:00' })
    expect(factsOf('Pim Sayer')).toEqual({ Access: 'Deactivated', 'Last signed in': 'Not yet' })
    expect(fieldByLabel('Role for Ola Brandt', cardOf('Ola Brandt')).value).toBe('Service advisor')
  })

  it('offers no way to deactivate yourself', async () => {
    await mountPage()

    expect(queryButtonByName(/^Deactivate/, cardOf('Wren Castell'))).toBeNull()
    expect(buttonByName('Deactivate Ola Brandt')).toBeTruthy()
    expect(buttonByName('Reactivate Pim Sayer')).toBeTruthy()
  })

  it('asks before deactivating, saying their sessions end at once, and does nothing on cancel', async () => {
    await mountPage()

    buttonByName('Deactivate Ola Brandt').click()
    await flushPromises()

    const dialog = openDialog()
    expect(dialog?.querySelector('h2')?.textContent?.trim()).toBe('Deactivate Ola Brandt?')
    expect(dialog?.textContent).toMatch(/signed out on every device at once/)
    buttonByName('Cancel', dialog!).click()
    await flushPromises()

    expect(deactivateStaff).not.toHaveBeenCalled()
    await vi.waitFor(() => expect(openDialog()).toBeNull())
  })

  it('deactivates once confirmed and shows them as deactivated', async () => {
    vi.mocked(deactivateStaff).mockResolvedValue({ ...team[0]!, active: false })
    await mountPage()

    buttonByName('Deactivate Ola Brandt').click()
    await flushPromises()
    buttonByName('Deactivate', openDialog()!).click()
    await flushPromises()

    expect(deactivateStaff).toHaveBeenCalledWith(team[0]!.id)
    expect(factsOf('Ola Brandt').Access).toBe('Deactivated')
    expect(buttonByName('Reactivate Ola Brandt')).toBeTruthy()
    expect(statusMessages().join(' ')).toContain('Ola Brandt has been deactivated.')
  })

  it("shows the server's 409 in the dialog and keeps it open", async () => {
    vi.mocked(deactivateStaff).mockRejectedValue(
      new ApiError(409, 'last_owner', 'This is the only active owner. Make someone else an owner first.'),
    )
    await mountPage()

    buttonByName('Deactivate Ola Brandt').click()
    await flushPromises()
    buttonByName('Deactivate', openDialog()!).click()
    await flushPromises()

    expect(alertsIn(openDialog()!)).toEqual(['This is the only active owner. Make someone else an owner first.'])
    expect(factsOf('Ola Brandt').Access).toBe('Active')
  })

  it('reactivates after its own confirmation', async () => {
    vi.mocked(reactivateStaff).mockResolvedValue({ ...team[2]!, active: true })
    await mountPage()

    buttonByName('Reactivate Pim Sayer').click()
    await flushPromises()
    expect(openDialog()?.querySelector('h2')?.textContent?.trim()).toBe('Reactivate Pim Sayer?')
    buttonByName('Reactivate', openDialog()!).click()
    await flushPromises()

    expect(reactivateStaff).toHaveBeenCalledWith(team[2]!.id)
    expect(factsOf('Pim Sayer').Access).toBe('Active')
  })

  it('shows a last-owner 409 on the card whose role change it refused, keeping the old role', async () => {
    vi.mocked(changeStaffRole).mockRejectedValue(
      new ApiError(409, 'last_owner', 'This is the only active owner. Make someone else an owner first.'),
    )
    await mountPage()
    const card = cardOf('Wren Castell')

    await chooseOption(fieldByLabel('Role for Wren Castell', card), 'Technician', flushPromises)

    expect(changeStaffRole).toHaveBeenCalledWith(owner.id, 'technician')
    expect(alertsIn(card)).toEqual(['This is the only active owner. Make someone else an owner first.'])
    expect(fieldByLabel('Role for Wren Castell', card).value).toBe('Owner')
  })

  it('leaves the page for home when owners make themselves something else', async () => {
    vi.mocked(changeStaffRole).mockResolvedValue({ ...team[1]!, role: 'advisor' })
    vi.mocked(getMe).mockResolvedValue({ ...owner, role: 'advisor' })
    const { router } = await mountPage()

    await chooseOption(fieldByLabel('Role for Wren Castell', cardOf('Wren Castell')), 'Service advisor', flushPromises)

    expect(getMe).toHaveBeenCalledOnce()
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('staff-home'))
  })

  it('adds someone, saying an invitation will be e-mailed', async () => {
    const added = member('technician', { id: '4fb19e96-5072-43a4-9ebf-60810ac34e55', name: 'Tam Ives', email: 'tam@hollowmere.test' })
    vi.mocked(inviteStaff).mockResolvedValue(added)
    await mountPage()

    buttonByName('Add someone').click()
    await flushPromises()
    const dialog = openDialog()!
    expect(dialog.textContent).toMatch(/e-mail them an invitation with a link to sign in/)
    typeInto(fieldByLabel('Name', dialog), 'Tam Ives')
    typeInto(fieldByLabel('E-mail address', dialog), 'Tam@Hollowmere.test')
    await flushPromises()
    buttonByName('Send invitation', dialog).click()
    await flushPromises()

    expect(inviteStaff).toHaveBeenCalledWith({ name: 'Tam Ives', email: 'tam@hollowmere.test', role: 'technician' })
    expect(cardOf('Tam Ives')).toBeTruthy()
    expect(statusMessages().join(' ')).toContain('An invitation is on its way to tam@hollowmere.test.')
  })

  it('puts "already in use" on the e-mail field of the add dialog', async () => {
    vi.mocked(inviteStaff).mockRejectedValue(new ApiError(409, 'email_taken', 'Someone already uses that e-mail address on Tickover.'))
    await mountPage()

    buttonByName('Add someone').click()
    await flushPromises()
    const dialog = openDialog()!
    typeInto(fieldByLabel('Name', dialog), 'Tam Ives')
    typeInto(fieldByLabel('E-mail address', dialog), 'advisor@hollowmere.test')
    await flushPromises()
    buttonByName('Send invitation', dialog).click()
    await flushPromises()

    expect(fieldMessages(fieldByLabel('E-mail address', dialog))).toBe('Someone already uses that e-mail address on Tickover.')
    expect(openDialog()).not.toBeNull()
  })

  it('checks the new person with the shared rules before sending', async () => {
    await mountPage()

    buttonByName('Add someone').click()
    await flushPromises()
    const dialog = openDialog()!
    buttonByName('Send invitation', dialog).click()
    await flushPromises()

    expect(inviteStaff).not.toHaveBeenCalled()
    expect(fieldMessages(fieldByLabel('Name', dialog))).toBe('Enter their name')
  })
})
