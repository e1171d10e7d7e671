/** Decimal strings for hours, quantities and rates: exact scaled integers, never floats. */
import { describe, expect, it } from 'vitest'
import { decimalPattern, formatScaled, parseScaled } from '../../shared/estimate/decimal'

describe('parseScaled', () => {
  it.each([
    { text: '1.8', places: 2, expected: 180n },
    { text: '0', places: 2, expected: 0n },
    { text: '0.05', places: 2, expected: 5n },
    { text: '12', places: 3, expected: 12000n },
    { text: '2.5', places: 3, expected: 2500n },
    { text: '999999999.99', places: 2, expected: 99999999999n },
    // Beyond 2^53 the digits are re-read exactly instead of through a float.
    { text: '90071992547409931', places: 2, expected: 9007199254740993100n },
  ])('"$text" with $places places → $expected', ({ text, places, expected }) => {
    expect(parseScaled(text, places)).toBe(expected)
  })

  it.each(['', '.5', '5.', '01', '00', '1.234', '1e3', '-1', '+1', '1..2', '1.2.3', ' 1', '1 ', '1,5', '0.', 'NaN', 'Infinity'])(
    'refuses "%s" (at most 2 places)',
    (text) => {
      expect(() => parseScaled(text, 2)).toThrow(RangeError)
      expect(decimalPattern(2).test(text)).toBe(false)
    },
  )

  it.each(['0', '1', '1.5', '10.25', '123456789.99'])('the schema pattern and the parser agree on "%s"', (text) => {
    expect(decimalPattern(2).test(text)).toBe(true)
    expect(() => parseScaled(text, 2)).not.toThrow()
  })
})

describe('formatScaled', () => {
  it.each([
    { value: 180n, places: 2, expected: '1.8' },
    { value: 5, places: 2, expected: '0.05' },
    { value: 2000n, places: 2, expected: '20' },
    { value: 0, places: 2, expected: '0' },
    { value: 1234567n, places: 3, expected: '1234.567' },
    { value: 550n, places: 2, expected: '5.5' },
  ])('$value with $places places → "$expected"', ({ value, places, expected }) => {
    expect(formatScaled(value, places)).toBe(expected)
  })
})
