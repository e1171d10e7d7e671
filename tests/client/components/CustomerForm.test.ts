// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { VApp } from 'vuetify/components'
import type { ServerProblem } from '@/composables/field-errors'
import CustomerForm from '@/components/records/CustomerForm.vue'
import type { Customer, CustomerInput } from '@shared/schemas/records'
import { buttonByName, fieldByLabel, fieldMessages, openDialog, typeInto } from '../support/dom'
import { customer } from '../support/records'
import { createTestVuetify } from '../support/vuetify'

let unmount: (() => void) | undefined

function mountForm(opts: { customer?: Customer | null; problem?: ServerProblem | null } = {}) {
  const saved: CustomerInput[] = []
  const Host = defineComponent(
    () => () =>
      h(VApp, () =>
        h(CustomerForm, {
          open: true,
          customer: opts.customer ?? null,
          saving: false,
          problem: opts.problem ?? null,
          onSave: (input: CustomerInput) => saved.push(input),
        }),
      ),
  )
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify()] } })
  unmount = () => wrapper.unmount()
  return saved
}

/** The message above the fields; each field's own messages are live regions too, so they are left out. */
function formAlert(): string | null {
  return openDialog()?.querySelector('.v-alert[role="alert"]')?.textContent?.trim() ?? null
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
})

afterEach(() => {
  unmount?.()
  vi.unstubAllGlobals()
})

describe('CustomerForm', () => {
  it('asks for an e-mail address or a phone number, and an address to e-mail them at', async () => {
    const saved = mountForm()
    await flushPromises()
    typeInto(fieldByLabel('Name'), 'Ives Marlow')
    await flushPromises()

    buttonByName('Add customer', openDialog() ?? document).click()
    await flushPromises()

    expect(fieldMessages(fieldByLabel('E-mail address'))).toBe('Enter an e-mail address or a phone number')
    expect(fieldMessages(fieldByLabel('By e-mail'))).toBe('Add an e-mail address to contact them by e-mail')
    expect(saved).toEqual([])
  })

  it('shows the server’s 422 issue on the e-mail field, and its message up top when no field fits', async () => {
    mountForm({
      problem: {
        status: 422,
        code: 'validation_failed',
        message: 'Some of the details are not right.',
        issues: [{ path: ['body', 'email'], message: 'Enter a valid e-mail address, like name@example.com' }],
      },
    })
    await flushPromises()
    expect(fieldMessages(fieldByLabel('E-mail address'))).toBe('Enter a valid e-mail address, like name@example.com')
    expect(formAlert()).toBeNull()
    unmount?.()

    mountForm({ problem: { status: 503, code: 'not_ready', message: 'The database cannot be reached right now.', issues: [] } })
    await flushPromises()
    expect(formAlert()).toBe('The database cannot be reached right now.')
  })

  it('edits a customer, sending one address line per line of the box', async () => {
    const saved = mountForm({ customer: customer() })
    await flushPromises()
    expect(fieldByLabel('Name').value).toBe('Maris Fenwick')

    typeInto(fieldByLabel('Address'), '2 Scree Lane\n\n  Hollowmere  \n')
    fieldByLabel('By text message').click()
    await flushPromises()
    buttonByName('Save changes', openDialog() ?? document).click()
    await flushPromises()

    expect(saved).toEqual([
      {
        name: 'Maris Fenwick',
        email: 'maris@fenwick.test',
        phone: '07700 900123',
        addressLines: ['2 Scree Lane', 'Hollowmere'],
        postcode: 'HM2 4SL',
        contactByEmail: true,
        contactByPhone: false,
        contactBySms: true,
      },
    ])
  })
})
