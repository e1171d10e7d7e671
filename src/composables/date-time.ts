import { dateTimeFormat } from '@shared/dates'

/**
 * A moment as the workshop's clock showed it, whatever the time zone of the device reading it. UK
 * style by default, like the money formatter in shared/money.ts.
 */
export function formatDateTime(iso: string, timeZone: string, locale = 'en-GB'): string {
  return dateTimeFormat({ dateStyle: 'medium', timeStyle: 'short', timeZone }, locale).format(new Date(iso))
}
