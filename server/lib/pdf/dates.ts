/**
 * Dates and times as a document prints them, in the workshop's time zone (British English, 24-hour
 * clock). Each is put together from the formatter's parts, so the words and punctuation between
 * them are ours rather than the ICU version's.
 */
import { dateTimeFormat } from '../../../shared/dates'

function parts(iso: string, timeZone: string, month: 'long' | 'short', withZone: boolean): Record<string, string> {
  const format = dateTimeFormat({
    timeZone,
    day: 'numeric',
    month,
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    ...(withZone ? { timeZoneName: 'short' } : {}),
  })
  const out: Record<string, string> = {}
  for (const p of format.formatToParts(new Date(iso))) out[p.type] = p.value
  return out
}

/** "2 December 2026" */
export function longDate(iso: string, timeZone: string): string {
  const p = parts(iso, timeZone, 'long', false)
  return `${p.day} ${p.month} ${p.year}`
}

/** "2 Dec 2026 14:03" */
export function shortDateTime(iso: string, timeZone: string): string {
  const p = parts(iso, timeZone, 'short', false)
  return `${p.day} ${p.month} ${p.year} ${p.hour}:${p.minute}`
}

/** "2 December 2026 at 14:03 GMT (Europe/London)" */
export function dateTimeWithZone(iso: string, timeZone: string): string {
  const p = parts(iso, timeZone, 'long', true)
  return `${p.day} ${p.month} ${p.year} at ${p.hour}:${p.minute} ${p.timeZoneName} (${timeZone})`
}

/** A calendar date ("2026-12-16") is the same day everywhere, so it is read and shown in UTC. */
export function calendarDate(isoDate: string): string {
  return longDate(`${isoDate}T12:00:00Z`, 'UTC')
}
