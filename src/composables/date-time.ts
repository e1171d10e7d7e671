const formatters = new Map<string, Intl.DateTimeFormat>()

/**
 * A moment as the workshop's clock showed it, whatever the time zone of the device reading it. UK
 * style by default, like the money formatter in shared/money.ts.
 */
export function formatDateTime(iso: string, timeZone: string, locale = 'en-GB'): string {
  const key = `${locale}|${timeZone}`
  let formatter = formatters.get(key)
  if (!formatter) {
    formatter = new Intl.DateTimeFormat(locale, { dateStyle: 'medium', timeStyle: 'short', timeZone })
    formatters.set(key, formatter)
  }
  return formatter.format(new Date(iso))
}
