import { calculateEstimate } from '@shared/estimate'
import type { Decision } from '@shared/estimate/contract'
import { type EstimateSnapshot, snapshotToEngineInput } from '@shared/schemas/estimates'
import type { PortalDeposit, PortalEstimate } from '@shared/schemas/portal'
import { customerPrincipal } from '../support/principals'

/** Invented estimate for the portal's client tests; prices, names and plates describe nothing real. */
export const portalIds = {
  estimate: '83f5d23a-94b6-47e8-b2f3-a4e5f6078199',
  photoA: 'e9fb389a-fa1c-4d45-98f9-0a4b5c63e755',
  photoB: 'fa0c49ab-0b2d-4e56-89fa-1b5c6d74f866',
  question: '0b1d5abc-1c3e-4f67-9a0b-2c6d7e85a977',
}

export function snapshot(overrides: Partial<EstimateSnapshot> = {}): EstimateSnapshot {
  return {
    format: 1,
    estimateId: portalIds.estimate,
    number: 42,
    reference: 'E-0042',
    version: 1,
    expiresOn: '2026-03-31',
    currency: 'GBP',
    workshop: {
      name: 'Hollowmere 4x4',
      addressLines: ['Unit 4, Tarn Yard', 'Hollowmere'],
      postcode: 'HM1 2TY',
      phone: '01632 960 555',
      email: 'desk@hollowmere.test',
      vatNumber: 'GB000000000',
    },
    customer: { id: customerPrincipal.id, name: customerPrincipal.name, email: customerPrincipal.email },
    vehicle: { registration: 'HM15 KNX', make: 'Brackwater', model: 'Ridgeline 110', year: 2015, vin: null },
    message: 'Here is what we found on the ramp.',
    items: [
      {
        id: 'item-hub',
        number: 1,
        title: 'Front hub seal',
        severity: 'soon',
        customerNote: 'The seal is weeping oil onto the brake disc.',
        explanation: { what: 'Oil behind the hub.', why: 'Oil on the disc weakens the brakes.', ifLeft: 'The bearing runs dry and fails.' },
        measurement: null,
        photoIds: [portalIds.photoA, portalIds.photoB],
        requires: [],
        lines: [
          {
            id: 'l1',
            kind: 'labour',
            description: 'Strip hub, replace seal',
            hours: '1.5',
            rate: 8000,
            taxRate: '20',
            accessSteps: ['hub-off'],
            operationCode: null,
            category: 'standard',
          },
          { id: 'l2', kind: 'part', description: 'Hub seal', quantity: '2', unitPrice: 1250, taxRate: '20', partNumber: null },
        ],
      },
      {
        id: 'item-cv',
        number: 2,
        title: 'Front CV joint',
        severity: 'urgent',
        customerNote: 'The joint knocks on full lock.',
        explanation: null,
        measurement: 'Play 1.2 mm',
        photoIds: [],
        requires: [],
        lines: [
          {
            id: 'l3',
            kind: 'labour',
            description: 'Replace CV joint',
            hours: '2',
            rate: 8000,
            taxRate: '20',
            accessSteps: ['hub-off'],
            operationCode: null,
            category: 'standard',
          },
          { id: 'l4', kind: 'part', description: 'CV joint', quantity: '1', unitPrice: 9000, taxRate: '20', partNumber: null },
        ],
      },
      {
        id: 'item-boot',
        number: 3,
        title: 'CV boot clips',
        severity: 'watch',
        customerNote: '',
        explanation: null,
        measurement: null,
        photoIds: [],
        requires: ['item-cv'],
        lines: [{ id: 'l5', kind: 'fee', description: 'Clips', amount: 1500, taxRate: '20' }],
      },
    ],
    accessSteps: [{ code: 'hub-off', hours: '0.8', includes: [], label: 'hub off' }],
    taxMode: 'exclusive',
    taxRounding: 'per-line',
    discount: null,
    deposit: { kind: 'percent', value: '20' },
    ...overrides,
  }
}

export const pendingDecisions = { 'item-hub': 'pending', 'item-cv': 'pending', 'item-boot': 'pending' } as const satisfies Record<
  string,
  Decision
>

/** The server prices with the same engine; so do the fakes standing in for it here. */
export function priced(snap: EstimateSnapshot, decisions: Record<string, Decision>) {
  return calculateEstimate(snapshotToEngineInput(snap, decisions))
}

export function deposit(overrides: Partial<PortalDeposit> = {}): PortalDeposit {
  return { status: 'not_due', amountMinor: 0, currency: 'GBP', paidAt: null, refundedMinor: null, refundedAt: null, ...overrides }
}

export function portalEstimate(overrides: Partial<PortalEstimate> & { decisions?: Record<string, Decision> } = {}): PortalEstimate {
  const snap = overrides.snapshot ?? snapshot()
  const decisions = overrides.decisions ?? { ...pendingDecisions }
  return {
    id: portalIds.estimate,
    reference: snap.reference,
    status: 'opened',
    version: snap.version,
    latestVersion: snap.version,
    superseded: false,
    expired: false,
    withdrawn: false,
    canDecide: true,
    hash: 'a'.repeat(64),
    sentAt: '2026-03-02T09:30:00.000Z',
    snapshot: snap,
    decisions,
    result: priced(snap, decisions),
    confirmation: null,
    deposit: deposit(),
    questions: [],
    cancellation: {
      trader: {
        name: 'Hollowmere 4x4 Ltd',
        addressLines: ['Unit 4, Tarn Yard', 'Hollowmere'],
        postcode: 'HM1 2TY',
        phone: '01632 960 555',
        email: 'desk@hollowmere.test',
        vatNumber: 'GB000000000',
      },
      periodDays: 14,
      periodText: ['You have 14 days to cancel.', 'To cancel, tell the workshop.'],
      startWithinPeriodText: 'Please start the work within the 14 days. I understand I will pay for work done if I then cancel.',
      modelForm: { title: 'Cancellation form', lines: ['To: Hollowmere 4x4 Ltd', 'I cancel my contract for the following work:'] },
      notice: 'General guidance, not legal advice.',
    },
    ...overrides,
  }
}
