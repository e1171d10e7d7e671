/**
 * Text fields refuse what cannot be stored or shown. Character classes from Unicode (the Cc general
 * category: C0 U+0000–U+001F, DEL U+007F, C1 U+0080–U+009F); NUL is refused by PostgreSQL in text.
 */
import { describe, expect, it } from 'vitest'
import { safeText } from '../../shared/schemas/common'

describe('safeText', () => {
  const oneLine = safeText({ max: 100 })
  const multiline = safeText({ max: 100, multiline: true })

  it.each([
    // [what, text, accepted on one line, accepted multi-line]
    ['plain text', 'Front hub seal', true, true],
    ['a tab', 'a\tb', true, true],
    ['a line feed', 'a\nb', false, true],
    ['a carriage return', 'a\r\nb', false, true],
    ['NUL', 'a\u0000b', false, false],
    ['a vertical tab', 'a\u000Bb', false, false],
    ['unit separator (last C0)', 'a\u001Fb', false, false],
    ['DEL', 'a\u007Fb', false, false],
    ['next line (C1)', 'a\u0085b', false, false],
    ['application program command (last C1)', 'a\u009Fb', false, false],
    ['a no-break space', 'a\u00A0b', true, true],
    ['an emoji (a surrogate pair)', 'a\u{1F697}b', true, true],
    ['a lone high surrogate', 'a\uD83Db', false, false],
    ['a lone low surrogate', 'a\uDE97b', false, false],
  ])('%s: one line %s, multi-line %s', (_what, text, single, multi) => {
    expect(oneLine.safeParse(text).success).toBe(single)
    expect(multiline.safeParse(text).success).toBe(multi)
  })
})
