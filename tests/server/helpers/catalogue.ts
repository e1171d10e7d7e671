import { expect } from 'vitest'
import type { Database } from '../../../server/db/client'
import { accessSteps, labourOperationAccessSteps, labourOperations, parts } from '../../../server/db/schema'
import type { AccessStepInput, LabourOperationInput } from '../../../shared/schemas/catalogue'
import type { Browser, Fixture } from './fixtures'

type OperationDraft = Partial<LabourOperationInput> & Pick<LabourOperationInput, 'code' | 'name' | 'system' | 'side' | 'bookHours'>

/** Creates operations through the API as an owner would; every figure is a test input, not a reference value. */
export async function addOperations(owner: Browser, drafts: OperationDraft[]) {
  const ids: Record<string, string> = {}
  for (const d of drafts) {
    const res = await owner.post('/api/labour-operations', { category: 'standard', synonyms: [], vehicleGroups: [], accessSteps: [], ...d })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    ids[d.code] = res.body.id as string
  }
  return ids
}

export async function addSteps(owner: Browser, steps: Partial<AccessStepInput>[]) {
  const ids: Record<string, string> = {}
  for (const s of steps) {
    const res = await owner.post('/api/access-steps', { includes: [], ...s })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    ids[String(s.code)] = res.body.id as string
  }
  return ids
}

/** POSTs a CSV file the way the browser's upload helper does. */
export function sendCsv(b: Browser, path: string, csv: string) {
  return b.agent.post(path).set('Origin', 'http://127.0.0.1:3000').set('Content-Type', 'text/csv').send(csv)
}

export const csv = (...lines: string[]) => `${lines.join('\r\n')}\r\n`

/** One access step, an operation that uses it, and a part, in the fixture's workshop; for tests that need ids. */
export async function addCatalogueRecords(db: Database, own: Fixture) {
  const workshopId = own.workshop.id
  const [step] = await db.insert(accessSteps).values({ workshopId, code: 'FX-STEP', name: 'Fixture step', hours: '0.5' }).returning()
  const [operation] = await db
    .insert(labourOperations)
    .values({
      workshopId,
      code: 'FX-OP',
      name: 'Fixture operation',
      system: 'steering',
      side: 'none',
      bookHours: '1',
      category: 'standard',
    })
    .returning()
  const [part] = await db
    .insert(parts)
    .values({ workshopId, partNumber: 'FX-PART', description: 'Fixture part', costMinor: 100, taxRate: '20' })
    .returning()
  if (!step || !operation || !part) throw new Error('catalogue fixture insert returned nothing')
  // The step is in use, so deleting it is refused and it stays for every caller of a test.
  await db.insert(labourOperationAccessSteps).values({ workshopId, operationId: operation.id, accessStepId: step.id, position: 0 })
  return { step: step.id, operation: operation.id, part: part.id }
}
