/**
 * Decimal text for hours, quantities, rates and readings: exact scaled integers, never floats.
 * The values are invented; each expected figure is the decimal worked out by hand.
 */
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  compareTruncated,
  decimalPattern,
  formatScaled,
  fromHundredths,
  hundredthsPattern,
  normalizeDecimal,
  parseScaled,
  readingPattern,
  toHundredths,
  truncateScaled,
} from '../../shared/decimal'

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

  it('reads back what it writes', () => {
    fc.assert(
      fc.property(fc.bigInt({ min: 0n, max: 10n ** 20n }), fc.integer({ min: 0, max: 6 }), (value, places) => {
        expect(parseScaled(formatScaled(value, places), places)).toBe(value)
      }),
    )
  })
})

describe('the patterns differ in what they allow before the point', () => {
  it.each([
    // [text, decimalPattern(2) (the estimate contract), hundredthsPattern (the catalogue), readingPattern (inspection)]
    ['1.5', true, true, true],
    ['999999999', true, true, true],
    ['1000000000', false, true, true],
    ['1.234', false, false, true],
    ['01', false, false, true],
    ['0.125', false, false, true],
    ['.5', false, false, false],
    ['1.', false, false, false],
    ['-1', false, false, false],
  ] as const)('"%s": estimate %s, catalogue %s, reading %s', (text, estimate, catalogue, reading) => {
    expect(decimalPattern(2).test(text)).toBe(estimate)
    expect(hundredthsPattern.test(text)).toBe(catalogue)
    expect(readingPattern.test(text)).toBe(reading)
  })

  it('hundredthsPattern accepts exactly what parseScaled reads with two places', () => {
    fc.assert(
      fc.property(fc.stringMatching(/^[0-9.\-e ]{0,8}$/), (text) => {
        let parsed = true
        try {
          parseScaled(text, 2)
        } catch {
          parsed = false
        }
        expect(parsed).toBe(hundredthsPattern.test(text))
      }),
    )
  })
})

describe('hours as hundredths', () => {
  it.each([
    ['0', 0],
    ['0.1', 10],
    ['1.5', 150],
    ['1.50', 150],
    ['12.05', 1205],
  ])('%s h is %i hundredths', (text, hundredths) => {
    expect(toHundredths(text)).toBe(hundredths)
  })

  it('writes the shortest form back', () => {
    expect(fromHundredths(150)).toBe('1.5')
    expect(fromHundredths(100)).toBe('1')
    expect(fromHundredths(5)).toBe('0.05')
    expect(normalizeDecimal('2.50')).toBe('2.5')
  })

  it.each(['', '.5', '1.', '1.234', '01', '-1', '1e2', ' 1'])('refuses "%s"', (text) => {
    expect(() => toHundredths(text)).toThrow(RangeError)
  })

  it.each([
    // 2^53 hundredths is the first count a float cannot hold exactly (Number.MAX_SAFE_INTEGER + 1).
    ['90071992547409.92', /Too large/],
    ['100000000000000', /Too large/],
  ])('refuses %s: past the safe-integer range', (text, message) => {
    expect(() => toHundredths(text)).toThrow(message)
  })

  it.each([-1, 1.5, Number.MAX_SAFE_INTEGER + 1])('refuses to write %d hundredths', (value) => {
    expect(() => fromHundredths(value)).toThrow(RangeError)
  })
})

describe('readings are truncated where parseScaled refuses', () => {
  it.each([
    { text: '0.125', places: 6, parsed: 125000n, truncated: 125000n },
    { text: '45', places: 6, parsed: 45000000n, truncated: 45000000n },
    { text: '0.1234567', places: 6, parsed: 'refused', truncated: 123456n },
    // Dropped, not rounded up.
    { text: '0.9999999', places: 6, parsed: 'refused', truncated: 999999n },
    { text: '007.5', places: 2, parsed: 'refused', truncated: 750n },
  ])('"$text" to $places places: parseScaled $parsed, truncateScaled $truncated', ({ text, places, parsed, truncated }) => {
    if (parsed === 'refused') expect(() => parseScaled(text, places)).toThrow(RangeError)
    else expect(parseScaled(text, places)).toBe(parsed)
    expect(truncateScaled(text, places)).toBe(truncated)
  })

  it.each([
    { a: '44.9', b: '45', expected: -1 },
    { a: '45', b: '45.0', expected: 0 },
    { a: '45.1', b: '45', expected: 1 },
    // The seventh place is dropped, so this is not over the limit.
    { a: '45.0000001', b: '45', expected: 0 },
    { a: '45.000001', b: '45', expected: 1 },
    { a: '10', b: '9.99', expected: 1 },
  ] as const)('"$a" against "$b" at 6 places → $expected', ({ a, b, expected }) => {
    expect(compareTruncated(a, b, 6)).toBe(expected)
  })
})
