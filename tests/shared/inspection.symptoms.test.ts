import { describe, expect, it } from 'vitest'
import { starterChecks } from '../../shared/inspection/starter-template'
import { symptomCodes, symptoms, symptomsInConcern } from '../../shared/inspection/symptoms'

// The causes and the checks that confirm them are common practice (see the file's header); these
// tests hold the data to the starter template so the guide never points at a check that is not there.
const starterCodes = new Set(starterChecks.map((c) => c.code))

describe('symptom guide data', () => {
  it('covers the four symptoms an advisor hears at intake, once each, in order', () => {
    expect(symptoms.map((s) => s.code)).toEqual([...symptomCodes])
    expect(symptoms.map((s) => s.label)).toEqual(['Loss of drive', 'Vibration or judder', 'Noise', 'Knock on take-up of drive'])
  })

  it.each(symptoms.flatMap((s) => s.causes.map((c) => [s.label, c.label, c.checks] as const)))(
    '%s → %s names only checks of the starter template',
    (_symptom, _cause, checks) => {
      expect(checks.length).toBeGreaterThan(0)
      for (const code of checks) expect(starterCodes, `${code} is not in the starter template`).toContain(code)
    },
  )

  it('gives every symptom at least three likely causes, none listed twice', () => {
    for (const s of symptoms) {
      expect(s.causes.length, s.label).toBeGreaterThanOrEqual(3)
      expect(new Set(s.causes.map((c) => c.label)).size, s.label).toBe(s.causes.length)
    }
  })

  it('points a knock on take-up at the backlash, UJ and slider checks', () => {
    const knock = symptoms.find((s) => s.code === 'knock-on-take-up')
    const codes = new Set(knock?.causes.flatMap((c) => c.checks))
    expect([...codes]).toEqual(expect.arrayContaining(['diff-backlash', 'prop-uj-play', 'prop-spline-play', 'tbox-centre-diff']))
  })
})

describe('symptomsInConcern', () => {
  it.each([
    ['Knock from the front when pulling away, worse on full lock.', ['knock-on-take-up']],
    ['Vibration through the floor above 50 mph.', ['vibration']],
    ['Clicking noise on full lock and a clunk when pulling away', ['noise', 'knock-on-take-up']],
    ['Revs but won’t go, one wheel spins', ['loss-of-drive']],
    ['Oil on the inside of the front wheels after green-laning.', []],
  ] as const)('reads “%s” as %j', (concern, expected) => {
    expect(symptomsInConcern(concern)).toEqual(expected)
  })
})
