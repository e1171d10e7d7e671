/**
 * Dates and times, for every runtime: one cache of Intl.DateTimeFormat objects (building one costs far
 * more than using it), the time zone a workshop is in when none is known yet, and the one way an
 * instant becomes ISO 8601 text in API answers.
 */

/** The workshop table's default (server/db/schema/workshops.ts); shown until the signed-in workshop's own zone is known. */
export const DEFAULT_TIME_ZONE = 'Europe/London'

const formats = new Map<string, Intl.DateTimeFormat>()

/** A cached formatter; UK style by default, like the money formatter in shared/money.ts. */
export function dateTimeFormat(options: Intl.DateTimeFormatOptions, locale = 'en-GB'): Intl.DateTimeFormat {
  const key = `${locale}|${JSON.stringify(options)}`
  let format = formats.get(key)
  if (!format) {
    format = new Intl.DateTimeFormat(locale, options)
    formats.set(key, format)
  }
  return format
}

/** An instant as ISO 8601 text, or null when there is none. */
export function iso(d: Date | null | undefined): string | null {
  return d ? d.toISOString() : null
}
