import { type ComputedRef, computed } from 'vue'
import { useAuthStore } from '@/stores/auth'
import { DEFAULT_TIME_ZONE, dateTimeFormat } from '@shared/dates'

/** The time zone of the workshop whose staff member or customer is signed in; the default until that is known. */
export function useWorkshopTimeZone(): ComputedRef<string> {
  const auth = useAuthStore()
  return computed(() => (auth.staff ?? auth.customer)?.workshop.timezone ?? DEFAULT_TIME_ZONE)
}

/**
 * A moment as the workshop's clock showed it, whatever the time zone of the device reading it. UK
 * style by default, like the money formatter in shared/money.ts.
 */
export function formatDateTime(iso: string, timeZone: string, locale = 'en-GB'): string {
  return dateTimeFormat({ dateStyle: 'medium', timeStyle: 'short', timeZone }, locale).format(new Date(iso))
}

/**
 * "Tuesday 31 March 2026" for a calendar date (YYYY-MM-DD), the same on every device whatever its
 * time zone. Put together from parts because browsers differ on the comma after the weekday.
 */
export function formatLongDay(isoDate: string): string {
  const parts = dateTimeFormat({ weekday: 'long', day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' }).formatToParts(
    new Date(`${isoDate}T00:00:00Z`),
  )
  const part = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? ''
  return `${part('weekday')} ${part('day')} ${part('month')} ${part('year')}`
}
