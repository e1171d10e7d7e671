import { describe, expect, it } from 'vitest'
import { createVuetify } from 'vuetify'
import { vuetifyOptions } from '@/plugins/vuetify'
import { severities } from '@shared/schemas/severity'

/**
 * WCAG 2.2 definitions of "relative luminance" and "contrast ratio"
 * (https://www.w3.org/TR/WCAG22/#dfn-relative-luminance, #dfn-contrast-ratio);
 * SC 1.4.3 Contrast (Minimum), level AA, asks for at least 4.5:1 for normal-size text.
 */
function relativeLuminance(hex: string): number {
  // Vuetify writes its own on-colours in the short form, #FFF.
  const full = /^#[0-9a-f]{3}$/i.test(hex) ? `#${[...hex.slice(1)].map((d) => d + d).join('')}` : hex
  const match = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(full)
  if (!match) throw new Error(`Not a #RGB or #RRGGBB colour: ${hex}`)
  const [r, g, b] = match.slice(1).map((pair) => {
    const c = parseInt(pair, 16) / 255
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4
  }) as [number, number, number]
  return 0.2126 * r + 0.7152 * g + 0.0722 * b
}

function contrastRatio(a: string, b: string): number {
  const [lighter, darker] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x) as [number, number]
  return (lighter + 0.05) / (darker + 0.05)
}

const AA_NORMAL_TEXT = 4.5

describe('contrastRatio (checked against known values)', () => {
  it('gives 21:1 for black on white and 1:1 for a colour on itself', () => {
    expect(contrastRatio('#000000', '#FFFFFF')).toBeCloseTo(21, 5)
    expect(contrastRatio('#000', '#FFF')).toBeCloseTo(21, 5)
    expect(contrastRatio('#2F5F8A', '#2F5F8A')).toBeCloseTo(1, 5)
  })

  it('puts #767676 just above and #777777 just below 4.5:1 on white, as commonly cited', () => {
    expect(contrastRatio('#767676', '#FFFFFF')).toBeCloseTo(4.54, 2)
    expect(contrastRatio('#777777', '#FFFFFF')).toBeLessThan(AA_NORMAL_TEXT)
  })
})

describe('severity colours', () => {
  it.each(Object.entries(severities))('white text on %s meets WCAG AA 4.5:1', (_name, severity) => {
    expect(contrastRatio('#FFFFFF', severity.colour)).toBeGreaterThanOrEqual(AA_NORMAL_TEXT)
  })
})

describe('the tickover theme', () => {
  const colours = createVuetify(vuetifyOptions).theme.computedThemes.value.tickover!.colors
  const filled = ['primary', 'secondary', 'error', 'warning', 'info', 'success', 'urgent', 'soon', 'watch', 'ok']

  // Vuetify picks each on-colour itself (by APCA); this checks its pick against WCAG 2.
  it.each(filled)('text on a %s background meets WCAG AA 4.5:1', (name) => {
    const background = colours[name]
    const text = colours[`on-${name}`]
    if (typeof background !== 'string' || typeof text !== 'string') {
      throw new Error(`Theme has no hex ${name} / on-${name}`)
    }

    expect(contrastRatio(text, background)).toBeGreaterThanOrEqual(AA_NORMAL_TEXT)
  })
})
