/**
 * Money typed in major units becomes minor units with as many decimal places as the currency's
 * ISO 4217 minor unit allows. The digit counts are cross-checked against the ISO list as packaged
 * by currency-codes (pinned at 2.2.0); the typed amounts are invented.
 */
import cc from 'currency-codes'
import { describe, expect, it } from 'vitest'
import { formatMajorUnits, formatMoney, moneyText, parseMajorUnits, parseMoney, SUPPORTED_CURRENCIES } from '../../shared/money'

describe('parseMoney', () => {
  it.each([
    // Source: ISO 4217 minor units (via currency-codes 2.2.0): GBP 2, JPY 0, KWD 3.
    { currency: 'GBP', text: '12.50', minor: 1250 },
    { currency: 'GBP', text: '12.5', minor: 1250 },
    { currency: 'GBP', text: '12', minor: 1200 },
    { currency: 'GBP', text: ' 0.07 ', minor: 7 },
    { currency: 'JPY', text: '1250', minor: 1250 },
    { currency: 'KWD', text: '1.250', minor: 1250 },
    { currency: 'KWD', text: '1.25', minor: 1250 },
  ])('$text $currency is $minor minor units', ({ currency, text, minor }) => {
    expect(cc.code(currency)?.digits).toBe({ GBP: 2, JPY: 0, KWD: 3 }[currency])
    expect(parseMoney(text, currency)).toBe(minor)
  })

  it.each([
    ['12.505', 'GBP'],
    ['12.5', 'JPY'],
    ['1.2505', 'KWD'],
    ['-1', 'GBP'],
    ['1,250.00', 'GBP'],
    ['£12', 'GBP'],
    ['12.', 'GBP'],
    ['.5', 'GBP'],
    ['012', 'GBP'],
    ['1e3', 'GBP'],
    ['', 'GBP'],
    ['99999999999999999', 'GBP'],
  ])('refuses %j in %s', (text, currency) => {
    expect(parseMoney(text, currency)).toBeNull()
  })

  it('reads back what formatMoney writes, for every supported currency', () => {
    for (const code of SUPPORTED_CURRENCIES) {
      const digits = cc.code(code)?.digits ?? 0
      const minor = 123456
      // formatMoney's output carries a symbol and grouping; the plain decimal is what a person types.
      const typed = digits === 0 ? String(minor) : `${String(minor).slice(0, -digits)}.${String(minor).slice(-digits)}`
      expect(parseMoney(typed, code), `${code} ${typed} (${formatMoney(minor, code)})`).toBe(minor)
    }
  })
})

describe('formatMajorUnits and moneyText', () => {
  it.each([
    // Source: ISO 4217 minor units (via currency-codes 2.2.0): GBP 2, JPY 0, KWD 3.
    { minor: 1250, exponent: 2, text: '12.50' },
    { minor: 7, exponent: 2, text: '0.07' },
    { minor: 0, exponent: 2, text: '0.00' },
    { minor: 1250, exponent: 0, text: '1250' },
    { minor: 1250, exponent: 3, text: '1.250' },
  ])('$minor with $exponent minor digits is "$text"', ({ minor, exponent, text }) => {
    expect(formatMajorUnits(minor, exponent)).toBe(text)
    expect(parseMajorUnits(text, exponent)).toBe(minor)
  })

  it('parses and writes in the currency the getter names at the time', () => {
    let currency = 'GBP'
    const money = moneyText(() => currency)
    expect(money.parse('12.5')).toBe(1250)
    expect(money.format(1250)).toBe('12.50')
    currency = 'JPY'
    expect(money.parse('12.5')).toBeNull()
    expect(money.format(1250)).toBe('1250')
  })
})
