import { roleLabels } from '@shared/auth/policy'
import { dateTimeFormat } from '@shared/dates'
import type { Customer, Vehicle } from '@shared/schemas/records'
import type { StaffMember } from '@shared/schemas/staff'

const dayOptions: Intl.DateTimeFormatOptions = { day: 'numeric', month: 'short', year: 'numeric' }
const numberFormat = new Intl.NumberFormat('en-GB')

/** A calendar date (`2026-03-02`, no time of day) as "2 Mar 2026"; read as UTC so no time zone shifts the day. */
export function formatDay(isoDate: string): string {
  return dateTimeFormat({ ...dayOptions, timeZone: 'UTC' }).format(new Date(`${isoDate}T00:00:00Z`))
}

/** The day a moment fell on by the workshop's clock, e.g. when a record was added. */
export function formatDayOf(iso: string, timeZone: string): string {
  return dateTimeFormat({ ...dayOptions, timeZone }).format(new Date(iso))
}

/** "Corrin Stag 110 (2014)" */
export function vehicleTitle(v: Pick<Vehicle, 'make' | 'model' | 'year'>): string {
  return v.year ? `${v.make} ${v.model} (${v.year})` : `${v.make} ${v.model}`
}

export function odometerText(v: Pick<Vehicle, 'odometer' | 'odometerUnit'>): string | null {
  return v.odometer === null ? null : `${numberFormat.format(v.odometer)} ${v.odometerUnit === 'km' ? 'km' : 'miles'}`
}

/** "E-mail and text message", or null when the customer asked for none. */
export function contactPreferences(c: Pick<Customer, 'contactByEmail' | 'contactByPhone' | 'contactBySms'>): string | null {
  const ways = [c.contactByEmail && 'e-mail', c.contactByPhone && 'phone call', c.contactBySms && 'text message'].filter((w): w is string =>
    Boolean(w),
  )
  if (ways.length === 0) return null
  const text = ways.length === 1 ? ways[0]! : `${ways.slice(0, -1).join(', ')} and ${ways.at(-1)}`
  return text.charAt(0).toUpperCase() + text.slice(1)
}

/** Who a job can be given to: active staff, technicians first, each with their role. */
export function technicianOptions(members: readonly StaffMember[]): { value: string; title: string; subtitle: string }[] {
  return members
    .filter((m) => m.active)
    .sort((a, b) => Number(b.role === 'technician') - Number(a.role === 'technician') || a.name.localeCompare(b.name))
    .map((m) => ({ value: m.id, title: m.name, subtitle: roleLabels[m.role] }))
}
