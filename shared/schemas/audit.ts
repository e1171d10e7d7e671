import { z } from 'zod'
import { listQuerySchema } from './common'

export const auditActions = [
  'sign_in.requested',
  'sign_in.succeeded',
  'sign_in.failed',
  'sign_out',
  'session.expired',
  'staff.invited',
  'staff.role_changed',
  'staff.deactivated',
  'staff.reactivated',
  'settings.changed',
  'estimate.created',
  'estimate.sent',
  'estimate.withdrawn',
  'estimate.email_resent',
  'deposit.checkout_started',
  'deposit.paid',
  'deposit.refunded',
  'estimate.opened',
  'estimate.decided',
  'estimate.confirmed',
  'estimate.question_asked',
  'estimate.question_answered',
  'estimate.link_renewed',
] as const
export const AuditActionSchema = z.enum(auditActions)
export type AuditAction = z.infer<typeof AuditActionSchema>

export const AuditEventSchema = z.object({
  id: z.string(),
  action: z.string(),
  actorKind: z.enum(['staff', 'customer', 'anonymous', 'system']),
  actorId: z.string().nullable(),
  actorName: z.string().nullable(),
  subjectType: z.string().nullable(),
  subjectId: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
  ip: z.string().nullable(),
  userAgent: z.string().nullable(),
  createdAt: z.string(),
})
export type AuditEvent = z.infer<typeof AuditEventSchema>

export const AuditListQuerySchema = listQuerySchema(['createdAt', 'action'] as const).extend({
  action: z.string().max(60).optional(),
  actorId: z.uuid().optional(),
  from: z.iso.date().optional(),
  to: z.iso.date().optional(),
})
export type AuditListQuery = z.infer<typeof AuditListQuerySchema>
