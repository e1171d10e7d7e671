import { describe, expect, it } from 'vitest'
import { actionLabel, actorLabel, auditActionLabels, describeDetails } from '@/composables/audit-wording'
import { auditActions } from '@shared/schemas/audit'

const names = { 'id-kit': 'Kit Hollins' }

describe('actionLabel', () => {
  it('has plain words of our own for every action the server records', () => {
    for (const action of auditActions) {
      expect(actionLabel(action)).toBe(auditActionLabels[action])
      expect(actionLabel(action)).not.toMatch(/[._]/)
    }
  })

  it('still reads as words for an action added later', () => {
    expect(actionLabel('invoice.sent')).toBe('Invoice sent')
  })
})

describe('actorLabel', () => {
  it.each([
    [{ actorKind: 'staff', actorName: 'Kit Hollins' }, 'Kit Hollins'],
    [{ actorKind: 'customer', actorName: 'Juno Treadwell' }, 'Juno Treadwell (customer)'],
    [{ actorKind: 'anonymous', actorName: null }, 'Someone not signed in'],
    [{ actorKind: 'system', actorName: null }, 'Tickover'],
  ] as const)('names %o as %s', (event, label) => {
    expect(actorLabel(event)).toBe(label)
  })
})

describe('describeDetails', () => {
  const base = { subjectType: 'staff', subjectId: 'id-kit' }

  it('shows a role change as from → to, naming the person', () => {
    expect(describeDetails({ ...base, action: 'staff.role_changed', details: { from: 'technician', to: 'owner' } }, names)).toBe(
      'Kit Hollins: technician → owner',
    )
  })

  it('uses the role words people see, not codes', () => {
    expect(describeDetails({ ...base, action: 'staff.role_changed', details: { from: 'advisor', to: 'technician' } })).toBe(
      'service advisor → technician',
    )
  })

  it('says who was added and as what', () => {
    expect(describeDetails({ ...base, action: 'staff.invited', details: { email: 'kit@x.test', role: 'technician' } }, names)).toBe(
      'Kit Hollins: kit@x.test as technician',
    )
  })

  it('explains why a sign-in link failed', () => {
    expect(describeDetails({ action: 'sign_in.failed', details: { reason: 'already_used' }, subjectType: null, subjectId: null })).toBe(
      'Link already used',
    )
  })

  it('lists each changed setting with its old and new value', () => {
    const details = {
      changed: {
        phone: { from: null, to: '01632 960999' },
        addressLines: { from: ['1 Old Yard'], to: ['Unit 4', 'New Yard'] },
      },
    }
    expect(describeDetails({ action: 'settings.changed', details, subjectType: 'workshop', subjectId: 'w' })).toBe(
      'Phone: (blank) → 01632 960999; Address: 1 Old Yard → Unit 4, New Yard',
    )
  })

  it('falls back to key: value for anything it does not know', () => {
    expect(describeDetails({ action: 'estimate.sent', details: { version: 2, to: 'a@b.test' }, subjectType: null, subjectId: null })).toBe(
      'version: 2; to: a@b.test',
    )
  })
})
