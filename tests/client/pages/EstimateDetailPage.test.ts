// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { getPricing, listAccessSteps } from '@/api/catalogue'
import { addFindings, getEstimate, saveDraft, sendEstimate } from '@/api/estimates'
import EstimateDetailPage from '@/pages/staff/EstimateDetailPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import { AUTOSAVE_DELAY_MS } from '@/stores/estimate'
import type { StaffRole } from '@shared/auth/policy'
import type { EstimateDetail } from '@shared/schemas/estimates'
import { buttonByName, fieldByLabel, openDialog, queryButtonByName, statusMessages, typeInto } from '../support/dom'
import { draft, draftItem, estimateDetail, estimateIds } from '../support/estimates'
import { staffPrincipal } from '../support/principals'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/estimates', () => ({
  listEstimates: vi.fn(),
  getEstimate: vi.fn(),
  createEstimate: vi.fn(),
  saveDraft: vi.fn(),
  addFindings: vi.fn(),
  sendEstimate: vi.fn(),
  withdrawEstimate: vi.fn(),
  resendEmail: vi.fn(),
  refundDeposit: vi.fn(),
  versionPdfUrl: (id: string, version: number) => `/api/estimates/${id}/versions/${version}/pdf?download=1`,
}))
vi.mock('@/api/catalogue', () => ({
  getPricing: vi.fn(),
  listAccessSteps: vi.fn(),
  searchLabour: vi.fn(),
  searchParts: vi.fn(),
}))

let unmount: (() => void) | undefined

const version1 = {
  id: estimateIds.version,
  version: 1,
  hash: 'ab',
  sentAt: '2026-03-02T14:03:00.000Z',
  expiresOn: '2026-03-16',
  supersededAt: null,
  openedAt: null,
  confirmedAt: null,
  proposedGross: 17400,
}

async function mountPage(detail: EstimateDetail, role: StaffRole = 'advisor') {
  vi.mocked(getEstimate).mockResolvedValue(detail)
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = staffPrincipal(role)
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'estimate', params: { id: detail.id } })
  const Host = defineComponent(() => () => h(VApp, () => h(EstimateDetailPage, { id: detail.id })))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return wrapper
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  for (const fn of [getEstimate, saveDraft, sendEstimate, addFindings, getPricing, listAccessSteps]) vi.mocked(fn).mockReset()
  vi.mocked(getPricing).mockResolvedValue({
    currency: 'GBP',
    rates: { standard: 8000, diagnostic: 8500, specialist: 9500 },
    defaultTaxRate: '20',
    markupBands: [],
  })
  vi.mocked(listAccessSteps).mockResolvedValue({ items: [] })
  vi.mocked(saveDraft).mockImplementation(async (_id, revision, saved) => estimateDetail({ draft: saved, revision: revision + 1 }))
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
})

describe('estimate page', () => {
  it('names the estimate, its version and whether it is saved, and sends it after naming the customer’s e-mail', async () => {
    vi.mocked(sendEstimate).mockResolvedValue(estimateDetail({ status: 'sent', hasUnsentChanges: false, versions: [version1] }))
    const wrapper = await mountPage(estimateDetail())

    expect(wrapper.get('h1').text()).toBe('Estimate E-0042')
    expect(wrapper.text()).toContain('Version 1 — draft, not sent')
    expect(statusMessages()).toContain('All changes saved')

    buttonByName('Send').click()
    await flushPromises()
    const dialog = openDialog()
    expect(dialog?.textContent).toContain('maris@fenwick.test')
    buttonByName('Send', dialog!).click()
    await flushPromises()

    expect(sendEstimate).toHaveBeenCalledWith(estimateIds.estimate, 3)
    expect(wrapper.text()).toContain('Version 1 sent 2 Mar 14:03')
  })

  it('keeps Send greyed out, saying why, when the customer has no e-mail address', async () => {
    const wrapper = await mountPage(estimateDetail({ customer: { id: estimateIds.other, name: 'Maris Fenwick', email: null } }))

    expect(buttonByName('Send').hasAttribute('disabled')).toBe(true)
    expect(wrapper.text()).toContain('Maris Fenwick has no e-mail address. Add one on the customer’s page first.')
  })

  it('warns that sending changes replaces the version the customer has', async () => {
    await mountPage(estimateDetail({ status: 'opened', hasUnsentChanges: true, versions: [version1] }))

    buttonByName('Send changes').click()
    await flushPromises()

    expect(openDialog()?.textContent).toContain('Sending version 2 replaces version 1; the customer decides again on every item.')
  })

  it('saves an edited title shortly after typing stops and says so', async () => {
    await mountPage(estimateDetail())

    typeInto(fieldByLabel('Title'), 'Front hub strip and seal')
    await flushPromises()
    expect(statusMessages()).toContain('Saving…')

    await new Promise((resolve) => setTimeout(resolve, AUTOSAVE_DELAY_MS + 100))
    await flushPromises()

    expect(saveDraft).toHaveBeenCalledOnce()
    expect(vi.mocked(saveDraft).mock.calls[0]![2].items[0]?.title).toBe('Front hub strip and seal')
    expect(statusMessages()).toContain('All changes saved')
  })

  it('removes an item with a way to undo it', async () => {
    const wrapper = await mountPage(
      estimateDetail({ draft: draft({ items: [draftItem(), draftItem({ id: 'item-cv', title: 'CV joint' })] }) }),
    )

    buttonByName('Remove item 1').click()
    await flushPromises()
    expect(wrapper.findAll('article h3').map((h3) => h3.text())).toEqual(['Item 1: CV joint'])

    buttonByName('Undo').click()
    await flushPromises()
    expect(wrapper.findAll('article h3').map((h3) => h3.text())).toEqual(['Item 1: Front hub strip', 'Item 2: CV joint'])
  })

  it('adds findings as items, marking those already on the estimate', async () => {
    vi.mocked(addFindings).mockResolvedValue(estimateDetail({ revision: 4 }))
    await mountPage(
      estimateDetail({
        draft: draft({ items: [draftItem({ findingId: estimateIds.findingHub })] }),
        findings: [
          {
            id: estimateIds.findingHub,
            title: 'Hub seal weeping',
            severity: 'soon',
            position: 'left',
            measurement: null,
            usedByItemIds: ['item-hub'],
          },
          {
            id: estimateIds.findingSeal,
            title: 'Swivel ball pitted',
            severity: 'urgent',
            position: 'right',
            measurement: null,
            usedByItemIds: [],
          },
        ],
      }),
    )

    buttonByName('Add from findings').click()
    await flushPromises()
    const dialog = openDialog()!
    expect(dialog.textContent).toContain('Already on the estimate as item 1')
    fieldByLabel(/^Swivel ball pitted/, dialog).click()
    await flushPromises()
    buttonByName('Add as an item', dialog).click()
    await flushPromises()

    expect(addFindings).toHaveBeenCalledWith(estimateIds.estimate, 3, [estimateIds.findingSeal])
  })

  it('shows a withdrawn estimate without ways to change or send it', async () => {
    const wrapper = await mountPage(estimateDetail({ status: 'withdrawn', withdrawnAt: '2026-03-03T10:00:00.000Z' }))

    expect(wrapper.text()).toContain('This estimate was withdrawn.')
    expect(queryButtonByName('Send')).toBeNull()
    expect(queryButtonByName('Add item')).toBeNull()
    expect(fieldByLabel('Title').readOnly).toBe(true)
  })
})
