// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { describe, expect, it } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import SymptomGuidePage from '@/pages/staff/SymptomGuidePage.vue'
import { routes } from '@/router'
import { createTestVuetify } from '../support/vuetify'

async function mountPage(query: Record<string, string> = {}) {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'symptom-guide', query })
  const wrapper = mount(SymptomGuidePage, { global: { plugins: [createTestVuetify(), createPinia(), router] } })
  await flushPromises()
  return wrapper
}

function symptomSection(wrapper: Awaited<ReturnType<typeof mountPage>>, title: string) {
  const heading = wrapper.findAll('h2').find((h) => h.text() === title)
  if (!heading) throw new Error(`No symptom headed ${title}`)
  return wrapper.get(`section[aria-labelledby="${heading.attributes('id')}"]`)
}

const checksFor = (section: ReturnType<typeof symptomSection>, cause: string) =>
  section
    .get(`ul[aria-label="Checks that confirm: ${cause}"]`)
    .findAll('li')
    .map((li) => li.text())

describe('SymptomGuidePage', () => {
  it('lists, for a knock on take-up, each likely cause with the inspection checks that confirm it', async () => {
    const wrapper = await mountPage()
    const knock = symptomSection(wrapper, 'Knock on take-up of drive')

    expect(checksFor(knock, 'Excessive backlash in an axle')).toEqual(['Axle differentials · Backlash at the prop flange'])
    expect(checksFor(knock, 'Prop shaft UJ worn')).toEqual(['Prop shafts · UJ play (twist and lift across the joint)'])
    expect(checksFor(knock, 'Prop shaft slider splines worn')).toEqual([
      'Prop shafts · Spline play at the slider (turn one half against the other)',
    ])
    expect(checksFor(knock, 'Backlash between the transfer box outputs')).toEqual([
      'Transfer box · Centre differential and lock test',
      'Transfer box · Output flange bearing lift or play',
    ])
  })

  it('says it is common practice and that the technician’s checks decide', async () => {
    const wrapper = await mountPage()

    expect(wrapper.text()).toContain('Common workshop practice')
    expect(wrapper.text()).toContain('the technician’s checks on the vehicle decide')
  })

  it('reads the job’s concern, names the symptom it sounds like and puts it first', async () => {
    const wrapper = await mountPage({ concern: 'Knock from the front when pulling away, worse on full lock.' })

    expect(wrapper.text()).toContain('The customer said: Knock from the front when pulling away, worse on full lock.')
    expect(wrapper.text()).toContain('This sounds like: Knock on take-up of drive.')
    const titles = wrapper.findAll('section h2').map((h) => h.text())
    expect(titles[0]).toBe('Knock on take-up of drive')
    expect(symptomSection(wrapper, 'Knock on take-up of drive').text()).toContain('Matches the concern')
    expect(symptomSection(wrapper, 'Noise').text()).not.toContain('Matches the concern')
  })

  it('says so when the concern matches none of the symptoms', async () => {
    const wrapper = await mountPage({ concern: 'Oil on the inside of the front wheels after green-laning.' })

    expect(wrapper.text()).toContain('None of the symptoms below match those words.')
  })
})
