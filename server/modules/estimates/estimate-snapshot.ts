import { createHash } from 'node:crypto'
import canonicalize from 'canonicalize'
import { estimateReference, type EstimateDraft, type EstimateSnapshot } from '../../../shared/schemas/estimates'
import type { Explanation } from '../../../shared/schemas/inspections'

/**
 * The version hash: SHA-256 over the RFC 8785 (JSON Canonicalization Scheme) form of the snapshot,
 * so key order and number spelling cannot change it; any change of content or price does.
 */
export function snapshotHash(snapshot: EstimateSnapshot): string {
  const canonical = canonicalize(snapshot)
  if (canonical === undefined) throw new Error('snapshot cannot be canonicalised')
  return createHash('sha256').update(canonical, 'utf8').digest('hex')
}

interface SnapshotSources {
  estimate: { id: string; number: number }
  version: number
  draft: EstimateDraft
  currency: string
  workshop: EstimateSnapshot['workshop']
  customer: EstimateSnapshot['customer']
  vehicle: EstimateSnapshot['vehicle']
  /** What each item's finding says, by finding id; items without a finding have none. */
  findings?: ReadonlyMap<string, { explanation: Explanation; measurement: string | null; photoIds: string[] }>
}

/** The frozen content of a version: what the customer sees and decides on, and what the hash covers. */
export function buildSnapshot(s: SnapshotSources): EstimateSnapshot {
  const { draft } = s
  return {
    format: 1,
    estimateId: s.estimate.id,
    number: s.estimate.number,
    reference: estimateReference(s.estimate.number),
    version: s.version,
    expiresOn: draft.expiresOn,
    currency: s.currency,
    workshop: {
      name: s.workshop.name,
      addressLines: s.workshop.addressLines,
      postcode: s.workshop.postcode,
      phone: s.workshop.phone,
      email: s.workshop.email,
      vatNumber: s.workshop.vatNumber,
    },
    customer: { id: s.customer.id, name: s.customer.name, email: s.customer.email },
    vehicle: {
      registration: s.vehicle.registration,
      make: s.vehicle.make,
      model: s.vehicle.model,
      year: s.vehicle.year,
      vin: s.vehicle.vin,
    },
    message: draft.message,
    items: draft.items.map((item, index) => {
      const f = item.findingId ? s.findings?.get(item.findingId) : undefined
      return {
        id: item.id,
        number: index + 1,
        title: item.title,
        severity: item.severity,
        customerNote: item.customerNote,
        explanation: f?.explanation ?? null,
        measurement: f?.measurement ?? null,
        photoIds: f?.photoIds ?? [],
        requires: item.requires,
        lines: item.lines,
      }
    }),
    accessSteps: draft.accessSteps,
    taxMode: draft.taxMode,
    taxRounding: draft.taxRounding,
    discount: draft.discount,
    deposit: draft.deposit,
  }
}
