import { type ComputedRef, computed } from 'vue'
import { useAuthStore } from '@/stores/auth'
import { DEFAULT_TIME_ZONE } from '@shared/dates'

/** The time zone of the workshop whose staff member or customer is signed in; the default until that is known. */
export function useWorkshopTimeZone(): ComputedRef<string> {
  const auth = useAuthStore()
  return computed(() => (auth.staff ?? auth.customer)?.workshop.timezone ?? DEFAULT_TIME_ZONE)
}
