// @vitest-environment happy-dom
import { mdiAlert, mdiAlertOctagon, mdiCheckCircle, mdiEye } from '@mdi/js'
import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import SeverityChip from '@/components/app/SeverityChip.vue'
import { severities, type Severity } from '@shared/schemas/severity'
import { createTestVuetify } from '../support/vuetify'

const expected: [Severity, string, string][] = [
  ['urgent', 'Fix now — safety', mdiAlertOctagon],
  ['soon', 'Fix soon', mdiAlert],
  ['watch', 'Keep an eye on', mdiEye],
  ['ok', 'All good', mdiCheckCircle],
]

describe('SeverityChip', () => {
  it.each(expected)('shows %s as its word, its own icon and its colour', (severity, word, iconPath) => {
    const wrapper = mount(SeverityChip, { props: { severity }, global: { plugins: [createTestVuetify()] } })

    expect(wrapper.text()).toBe(word)
    expect(wrapper.get('svg path').attributes('d')).toBe(iconPath)
    expect(wrapper.get('.v-chip').classes()).toContain(`bg-${severity}`)
  })

  it('gives every level a differently shaped icon, so no two differ by colour alone', () => {
    const icons = Object.values(severities).map((s) => s.icon)

    expect(new Set(icons).size).toBe(icons.length)
  })
})
