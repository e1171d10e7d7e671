// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { afterEach, beforeAll, describe, expect, it } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import JobEstimateLink from '@/components/estimates/JobEstimateLink.vue'
import { routes } from '@/router'
import type { JobEstimate } from '@/stores/estimates'
import { buttonByName, queryButtonByName } from '../support/dom'
import { estimateIds } from '../support/estimates'
import { preloadRouteComponents } from '../support/router'
import { createTestVuetify } from '../support/vuetify'

let unmount: (() => void) | undefined

// Installing the router starts the first navigation; its lazy page must not load after the test has gone.
beforeAll(() => preloadRouteComponents())

function mountLink(props: { estimate: JobEstimate | null | undefined; canStart?: boolean }) {
  const router = createRouter({ history: createMemoryHistory(), routes })
  const wrapper = mount(JobEstimateLink, {
    props: { canStart: true, starting: false, ...props },
    global: { plugins: [createTestVuetify(), router] },
    attachTo: document.body,
  })
  unmount = () => wrapper.unmount()
  return wrapper
}

afterEach(() => {
  unmount?.()
  unmount = undefined
})

describe('JobEstimateLink', () => {
  it('opens the job’s estimate by its number when there is one', async () => {
    mountLink({ estimate: { id: estimateIds.estimate, reference: 'E-0042', status: 'sent' } })
    await flushPromises()

    expect(buttonByName('Open estimate E-0042').getAttribute('href')).toBe(`/estimates/${estimateIds.estimate}`)
    expect(queryButtonByName('Start estimate')).toBeNull()
  })

  it('offers to start one when the job has none, to those who may', async () => {
    const wrapper = mountLink({ estimate: null })
    buttonByName('Start estimate').click()
    expect(wrapper.emitted('start')).toHaveLength(1)

    await wrapper.setProps({ canStart: false })
    expect(queryButtonByName('Start estimate')).toBeNull()
    expect(wrapper.text()).toBe('No estimate yet.')
  })

  it('shows nothing while it is still being looked up', () => {
    const wrapper = mountLink({ estimate: undefined })
    expect(wrapper.text()).toBe('')
  })
})
