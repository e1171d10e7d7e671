import { describe, expect, it } from 'vitest'
import { normalisePhone, smsSegments } from '../../shared/sms'

/**
 * Sources. The alphabet: 3GPP TS 23.038 §6.2.1 (GSM 7-bit default alphabet, 128 positions of which
 * 0x1B is the escape to the extension table) and §6.2.1.1 (the extension table: form feed
 * ^ { } \ [ ~ ] | €, each sent as escape + code, two septets). The capacities: Twilio, "What the heck
 * is a segment?" and its Messaging Segment Calculator (github.com/TwilioDevEd/message-segment-calculator):
 * 160 GSM-7 characters or 70 UCS-2 units in one segment; 153 and 67 per segment once concatenated,
 * because the user data header takes 6 of the 140 octets; a character is never split between
 * segments. Those figures are from memory of Twilio's page; the calculator's source was read for
 * this work and agrees (1120 bits a segment, 48 for the header, 7 bits a septet, 16 a UCS-2 unit).
 */
const BASIC =
  '@£$¥èéùìòÇ\nØø\rÅåΔ_ΦΓΛΩΠΨΣΘΞÆæßÉ !"#¤%&\'()*+,-./0123456789:;<=>?¡ABCDEFGHIJKLMNOPQRSTUVWXYZÄÖÑÜ§¿abcdefghijklmnopqrstuvwxyzäöñüà'
const EXTENSION = '\f^{}\\[~]|€'

describe('smsSegments', () => {
  it('knows the 127 characters of the default alphabet (one septet each) and the 10 of the extension table (two each)', () => {
    expect([...BASIC]).toHaveLength(127)
    expect(smsSegments(BASIC)).toEqual({ encoding: 'GSM-7', units: 127, segments: 1 })
    expect(smsSegments(EXTENSION)).toEqual({ encoding: 'GSM-7', units: 20, segments: 1 })
    for (const c of BASIC) expect(smsSegments(c)).toEqual({ encoding: 'GSM-7', units: 1, segments: 1 })
    for (const c of EXTENSION) expect(smsSegments(c)).toEqual({ encoding: 'GSM-7', units: 2, segments: 1 })
  })

  it.each([
    // GSM-7: 160 in one segment, then 153 a segment.
    { text: '', encoding: 'GSM-7', units: 0, segments: 0, why: 'nothing to send' },
    { text: 'a'.repeat(160), encoding: 'GSM-7', units: 160, segments: 1, why: '160 fit one segment' },
    { text: 'a'.repeat(161), encoding: 'GSM-7', units: 161, segments: 2, why: 'one more makes two of 153' },
    { text: 'a'.repeat(306), encoding: 'GSM-7', units: 306, segments: 2, why: '2 × 153' },
    { text: 'a'.repeat(307), encoding: 'GSM-7', units: 307, segments: 3, why: 'one over 2 × 153' },
    { text: '€'.repeat(80), encoding: 'GSM-7', units: 160, segments: 1, why: 'extension characters count two' },
    { text: `€${'a'.repeat(159)}`, encoding: 'GSM-7', units: 161, segments: 2, why: 'one € pushes 160 characters over' },
    {
      text: `${'a'.repeat(152)}{${'a'.repeat(152)}`,
      encoding: 'GSM-7',
      units: 306,
      segments: 3,
      why: 'the { would straddle the first boundary, so it starts the second segment',
    },
    {
      text: 'Your Land Rover is ready: £123.45 due. Reply STOP to opt out.',
      encoding: 'GSM-7',
      units: 61,
      segments: 1,
      why: '£ is in the alphabet',
    },
    // UCS-2: 70 in one segment, then 67 a segment; characters beyond the BMP take two units.
    { text: 'ł'.repeat(70), encoding: 'UCS-2', units: 70, segments: 1, why: 'ł is not in GSM-7' },
    { text: 'ł'.repeat(71), encoding: 'UCS-2', units: 71, segments: 2, why: 'one more makes two of 67' },
    { text: 'ł'.repeat(134), encoding: 'UCS-2', units: 134, segments: 2, why: '2 × 67' },
    { text: 'ł'.repeat(135), encoding: 'UCS-2', units: 135, segments: 3, why: 'one over 2 × 67' },
    { text: '🙂', encoding: 'UCS-2', units: 2, segments: 1, why: 'an emoji is a surrogate pair' },
    { text: '🙂'.repeat(35), encoding: 'UCS-2', units: 70, segments: 1, why: '35 emoji fill one segment' },
    {
      text: `${'ł'.repeat(66)}🙂${'ł'.repeat(66)}`,
      encoding: 'UCS-2',
      units: 134,
      segments: 3,
      why: 'the emoji would straddle the first boundary',
    },
    { text: `${'a'.repeat(69)}—`, encoding: 'UCS-2', units: 70, segments: 1, why: 'one em dash makes the whole text UCS-2' },
    { text: 'It’s ready', encoding: 'UCS-2', units: 10, segments: 1, why: 'a curly apostrophe is not in GSM-7' },
    { text: 'ç', encoding: 'UCS-2', units: 1, segments: 1, why: 'only the capital Ç is in the alphabet' },
    { text: '`', encoding: 'UCS-2', units: 1, segments: 1, why: 'the backtick is not in the alphabet' },
    { text: `€${'ł'.repeat(69)}`, encoding: 'UCS-2', units: 70, segments: 1, why: 'in UCS-2 an extension character is one unit' },
  ])('$why: $encoding, $units units, $segments segments', ({ text, encoding, units, segments }) => {
    expect(smsSegments(text)).toEqual({ encoding, units, segments })
  })
})

/**
 * Numbers from Ofcom's ranges reserved for drama ("TV, radio and film numbers", Ofcom's numbering
 * guidance: 07700 900000–900999 for mobiles, 01632 960000–960999 for a geographic landline), which
 * belong to nobody. The +1 500 555 numbers are Twilio's test numbers (Twilio docs, "Test Credentials").
 */
describe('normalisePhone', () => {
  it.each([
    ['07700 900123', '+447700900123'],
    ['07700900000', '+447700900000'],
    ['07700 900999', '+447700900999'],
    ['+44 7700 900123', '+447700900123'],
    ['+44 (0)7700 900123', '+447700900123'],
    ['0044 7700 900123', '+447700900123'],
    ['07700-900-123', '+447700900123'],
    ['  07700 900123  ', '+447700900123'],
    ['01632 960123', '+441632960123'],
    ['+15005550006', '+15005550006'],
  ])('%j → %s', (input, e164) => {
    expect(normalisePhone(input)).toEqual({ ok: true, e164 })
  })

  it('reads a number without a country code as the given country’s', () => {
    // France's mobile numbers start 06 and have 9 digits after the 0 (ARCEP's national plan; libphonenumber-js metadata).
    expect(normalisePhone('06 12 34 56 78', 'FR')).toEqual({ ok: true, e164: '+33612345678' })
  })

  it.each([
    ['', 'empty'],
    ['   ', 'empty'],
    ['hello', 'not_a_number'],
    ['call 07700 900123', 'not_a_number'],
    ['+', 'not_a_number'],
    ['1', 'too_short'],
    ['0770', 'too_short'],
    ['077009001234', 'too_long'],
    ['+999 123 4567', 'invalid_country'],
    ['07700 900123 ext. 5', 'extension'],
  ] as const)('%j is refused: %s', (input, reason) => {
    const result = normalisePhone(input)
    expect(result).toMatchObject({ ok: false, reason })
    if (!result.ok) expect(result.message).toMatch(/\.$/)
  })
})
