import { roleLabels, staffRoles, type StaffRole } from '@shared/auth/policy'
import { auditActions, type AuditAction, type AuditEvent } from '@shared/schemas/audit'
import type { WorkshopSettings } from '@shared/schemas/workshop'

/** Our own words for what happened; `satisfies` fails the build when the server gains an action. */
export const auditActionLabels = {
  'sign_in.requested': 'Sign-in link asked for',
  'sign_in.succeeded': 'Signed in',
  'sign_in.failed': 'Sign-in link failed',
  sign_out: 'Signed out',
  'session.expired': 'Signed out after a long session',
  'staff.invited': 'Person added',
  'staff.role_changed': 'Role changed',
  'staff.deactivated': 'Access switched off',
  'staff.reactivated': 'Access switched back on',
  'settings.changed': 'Workshop details changed',
  'estimate.created': 'Estimate started',
  'estimate.sent': 'Estimate sent to the customer',
  'estimate.withdrawn': 'Estimate withdrawn',
  'estimate.email_resent': 'Estimate e-mail sent again',
  'deposit.checkout_started': 'Deposit payment page opened',
  'deposit.paid': 'Deposit paid by card',
  'deposit.refunded': 'Deposit refunded',
  'estimate.opened': 'Estimate opened by the customer',
  'estimate.decided': 'Customer decided on an item',
  'estimate.confirmed': 'Customer confirmed their decisions',
  'estimate.question_asked': 'Customer asked a question',
  'estimate.question_answered': 'Question answered',
  'estimate.link_renewed': 'Fresh estimate link sent',
} satisfies Record<AuditAction, string>

export const auditActionOptions = auditActions.map((value) => ({ value, title: auditActionLabels[value] }))

function isKnownAction(action: string): action is AuditAction {
  return action in auditActionLabels
}

/** Actions added later still read as words, not codes, until they get a label of their own. */
export function actionLabel(action: string): string {
  if (isKnownAction(action)) return auditActionLabels[action]
  const words = action.replace(/[._]+/g, ' ').trim()
  return words.charAt(0).toUpperCase() + words.slice(1)
}

export function actorLabel(event: Pick<AuditEvent, 'actorKind' | 'actorName'>): string {
  if (event.actorKind === 'anonymous') return 'Someone not signed in'
  if (event.actorKind === 'system') return 'Tickover'
  const name = event.actorName ?? 'Unknown person'
  return event.actorKind === 'customer' ? `${name} (customer)` : name
}

const failureReasons: Record<string, string> = {
  unknown: 'Link not recognised',
  already_used: 'Link already used',
  expired: 'Link expired',
  audience_mismatch: 'Opened on the wrong sign-in page (staff or customer)',
  account_inactive: 'Account switched off',
  invalid_signature_or_expired: 'Link damaged or expired',
}

const settingLabels: Record<keyof WorkshopSettings, string> = {
  name: 'Name',
  addressLines: 'Address',
  postcode: 'Postcode',
  phone: 'Phone',
  email: 'E-mail',
  vatNumber: 'VAT number',
  currency: 'Currency',
  timezone: 'Time zone',
}

function isRole(value: unknown): value is StaffRole {
  return typeof value === 'string' && (staffRoles as readonly string[]).includes(value)
}

function roleWord(value: unknown): string {
  return isRole(value) ? roleLabels[value].toLowerCase() : String(value)
}

function settingValue(value: unknown): string {
  if (value === null || value === undefined || value === '') return '(blank)'
  if (Array.isArray(value)) return value.length ? value.join(', ') : '(blank)'
  return String(value)
}

function otherDetails(details: Record<string, unknown>): string {
  return Object.entries(details)
    .map(([key, value]) => `${key}: ${typeof value === 'object' && value !== null ? JSON.stringify(value) : String(value)}`)
    .join('; ')
}

/**
 * One readable line for the details of an event, e.g. "Kit Hollins: technician → owner".
 * `names` maps staff ids to names, so the person an event was about can be named.
 */
export function describeDetails(
  event: Pick<AuditEvent, 'action' | 'details' | 'subjectType' | 'subjectId'>,
  names: Record<string, string> = {},
): string {
  const { details } = event
  const subject = event.subjectType === 'staff' && event.subjectId ? names[event.subjectId] : undefined
  const about = (text: string) => (subject ? `${subject}: ${text}` : text)

  switch (event.action) {
    case 'staff.role_changed':
      return about(`${roleWord(details.from)} → ${roleWord(details.to)}`)
    case 'staff.invited':
      return about(`${String(details.email ?? '')} as ${roleWord(details.role)}`.trim())
    case 'staff.deactivated':
    case 'staff.reactivated':
    case 'sign_in.requested':
      return subject ?? ''
    case 'sign_in.failed': {
      const reason = typeof details.reason === 'string' ? details.reason : ''
      return failureReasons[reason] ?? otherDetails(details)
    }
    case 'settings.changed': {
      const changed = details.changed
      if (typeof changed !== 'object' || changed === null) return otherDetails(details)
      return Object.entries(changed as Record<string, { from?: unknown; to?: unknown }>)
        .map(([key, change]) => {
          const label = settingLabels[key as keyof WorkshopSettings] ?? key
          return `${label}: ${settingValue(change?.from)} → ${settingValue(change?.to)}`
        })
        .join('; ')
    }
    default:
      return otherDetails(details)
  }
}
