import type { DraftItem, EstimateDetail, EstimateDraft, EstimateSummary } from '@shared/schemas/estimates'
import { testIds } from './records'

/** Invented estimates for client tests; prices, names and plates describe nothing real. */
export const estimateIds = {
  estimate: '83f5d23a-94b6-47e8-b2f3-a4e5f6078199',
  other: '94a6e34b-a5c7-48f9-83a4-b5f607189200',
  findingHub: 'a5b7f45c-b6d8-4901-94b5-c6071829a311',
  findingSeal: 'b6c8056d-c7e9-4a12-a5c6-d7182930b422',
  email: 'c7d9167e-d8fa-4b23-b6d7-e8293a41c533',
  version: 'd8ea278f-e90b-4c34-87e8-f93a4b52d644',
}

export function draftItem(overrides: Partial<DraftItem> = {}): DraftItem {
  return {
    id: 'item-hub',
    findingId: null,
    title: 'Front hub strip',
    severity: 'soon',
    customerNote: '',
    requires: [],
    lines: [
      {
        id: 'line-hub-labour',
        kind: 'labour',
        description: 'Strip front hub and replace seal',
        hours: '1.5',
        rate: 8000,
        taxRate: '20',
        accessSteps: [],
        operationCode: null,
        category: 'standard',
      },
      { id: 'line-hub-seal', kind: 'part', description: 'Hub seal', quantity: '2', unitPrice: 1250, taxRate: '20', partNumber: 'HS-100' },
    ],
    ...overrides,
  }
}

export function draft(overrides: Partial<EstimateDraft> = {}): EstimateDraft {
  return {
    items: [draftItem()],
    accessSteps: [],
    taxMode: 'exclusive',
    taxRounding: 'per-line',
    discount: null,
    deposit: { kind: 'none' },
    expiresOn: '2026-03-31',
    message: '',
    ...overrides,
  }
}

export function estimateDetail(overrides: Partial<EstimateDetail> = {}): EstimateDetail {
  return {
    id: estimateIds.estimate,
    number: 42,
    reference: 'E-0042',
    status: 'draft',
    currency: 'GBP',
    job: { id: testIds.job, concern: 'Clunk from the back when pulling away', vehicleGroup: 'coil-sprung-live-axle' },
    customer: { id: testIds.customer, name: 'Maris Fenwick', email: 'maris@fenwick.test' },
    vehicle: { id: testIds.vehicle, registration: 'HM15 KNX', make: 'Brackwater', model: 'Ridgeline 110' },
    draft: draft(),
    revision: 3,
    hasUnsentChanges: true,
    versions: [],
    decisions: [],
    decided: null,
    emails: [],
    findings: [],
    withdrawnAt: null,
    notices: [],
    createdAt: '2026-03-02T09:00:00.000Z',
    updatedAt: '2026-03-02T09:30:00.000Z',
    ...overrides,
  }
}

export function estimateSummary(overrides: Partial<EstimateSummary> = {}): EstimateSummary {
  return {
    id: estimateIds.estimate,
    number: 42,
    reference: 'E-0042',
    status: 'sent',
    jobId: testIds.job,
    customerName: 'Maris Fenwick',
    registration: 'HM15 KNX',
    currency: 'GBP',
    proposedGross: 17400,
    approvedGross: null,
    depositMinor: null,
    hasUnsentChanges: false,
    latestVersion: 1,
    updatedAt: '2026-03-02T09:30:00.000Z',
    ...overrides,
  }
}
