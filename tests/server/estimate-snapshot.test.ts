import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { snapshotHash } from '../../server/modules/estimates/estimate-snapshot'
import type { EstimateSnapshot } from '../../shared/schemas/estimates'

/** Invented demo content; only its hash's behaviour is under test. */
const snapshot: EstimateSnapshot = {
  format: 1,
  estimateId: '4b1f9c56-3d7e-4e0a-9b65-0c2a7c1d9e11',
  number: 42,
  reference: 'E-0042',
  version: 1,
  expiresOn: '2026-12-16',
  currency: 'GBP',
  workshop: {
    name: 'Brackenfold 4x4 Works',
    addressLines: ['Unit 3, Mill Lane'],
    postcode: 'BF1 2AA',
    phone: null,
    email: 'desk@brackenfold4x4.test',
    vatNumber: null,
  },
  customer: { id: '0e7f5a9c-2b4d-4c61-8f3e-5a6b7c8d9e0f', name: 'Rhian Calloway', email: 'rhian.calloway@example.test' },
  vehicle: { registration: 'BF12 KTX', make: 'Harrowgate', model: 'Ridgeback 110', year: 2012, vin: null },
  message: '',
  items: [
    {
      id: 'a',
      number: 1,
      title: 'Swivel housing seal leaking — left',
      severity: 'soon',
      customerNote: '',
      explanation: null,
      measurement: null,
      photoIds: [],
      requires: [],
      lines: [
        {
          id: 'l1',
          kind: 'labour',
          description: 'Replace swivel housing oil seal',
          hours: '3.2',
          rate: 8500,
          taxRate: '20',
          accessSteps: [],
          operationCode: null,
          category: null,
        },
        { id: 'l2', kind: 'part', description: 'Seal kit', quantity: '1', unitPrice: 3190, taxRate: '20', partNumber: null },
        { id: 'l3', kind: 'fee', description: 'Oil disposal', amount: 450, taxRate: '20' },
      ],
    },
  ],
  accessSteps: [],
  taxMode: 'exclusive',
  taxRounding: 'per-line',
  discount: null,
  deposit: { kind: 'percent', value: '25' },
}

/** Rebuilds every object with its keys in reverse order. */
function reversedKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reversedKeys)
  if (value && typeof value === 'object')
    return Object.fromEntries(
      Object.entries(value)
        .reverse()
        .map(([k, v]) => [k, reversedKeys(v)]),
    )
  return value
}

describe('version hash (SHA-256 over RFC 8785 canonical JSON)', () => {
  it('is the same for the same content, whatever the key order', () => {
    const h = snapshotHash(snapshot)
    expect(h).toMatch(/^[0-9a-f]{64}$/)
    expect(snapshotHash(structuredClone(snapshot))).toBe(h)
    expect(snapshotHash(reversedKeys(snapshot) as EstimateSnapshot)).toBe(h)
  })

  it('changes with any price on any line', () => {
    const base = snapshotHash(snapshot)
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 2 }), fc.integer({ min: 1, max: 1_000_000 }), (lineIndex, delta) => {
        const copy = structuredClone(snapshot)
        const line = copy.items[0]?.lines[lineIndex]
        if (!line) throw new Error('no line')
        if (line.kind === 'labour') line.rate += delta
        else if (line.kind === 'part') line.unitPrice += delta
        else line.amount += delta
        expect(snapshotHash(copy)).not.toBe(base)
      }),
    )
  })

  it('changes with hours, tax rate, deposit policy and wording', () => {
    const base = snapshotHash(snapshot)
    const edits: ((s: EstimateSnapshot) => void)[] = [
      (s) => {
        const l = s.items[0]?.lines[0]
        if (l?.kind === 'labour') l.hours = '3.3'
      },
      (s) => {
        const l = s.items[0]?.lines[1]
        if (l) l.taxRate = '5'
      },
      (s) => {
        s.deposit = { kind: 'percent', value: '30' }
      },
      (s) => {
        const i = s.items[0]
        if (i) i.title = `${i.title}.`
      },
      (s) => {
        s.expiresOn = '2026-12-17'
      },
    ]
    for (const edit of edits) {
      const copy = structuredClone(snapshot)
      edit(copy)
      expect(snapshotHash(copy)).not.toBe(base)
    }
  })
})
