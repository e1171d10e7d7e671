import type {
  AccessStep,
  AccessStepInput,
  CatalogueTable,
  ClockTime,
  ClockTimeInput,
  ImportReport,
  LabourOperation,
  LabourOperationInput,
  LabourSearchQuery,
  LabourSystem,
  Part,
  PartInput,
  PartSearchQuery,
  Pricing,
  PricingInput,
  TimeComparisonRow,
} from '@shared/schemas/catalogue'
import type { Page } from '@shared/schemas/common'
import { uploadCsv } from './csv-upload'
import { API_BASE, request } from './http'
import { queryString } from './list-query'

const operationPath = (id: string) => `/labour-operations/${encodeURIComponent(id)}`
const stepPath = (id: string) => `/access-steps/${encodeURIComponent(id)}`
const partPath = (id: string) => `/parts/${encodeURIComponent(id)}`

/** Ranked by how well each operation matches `q`; by code when there is no `q`. `archived: true` lists only archived operations. */
export function searchLabour(params: LabourSearchQuery): Promise<Page<LabourOperation>> {
  return request<Page<LabourOperation>>('GET', `/labour-operations${queryString(params)}`)
}

export function getOperation(id: string): Promise<LabourOperation> {
  return request<LabourOperation>('GET', operationPath(id))
}

/** Rejects with 422 (issues on fields such as `['body', 'bookHours']`) or 409 `code_taken`. */
export function saveOperation(input: LabourOperationInput, id?: string): Promise<LabourOperation> {
  return id
    ? request<LabourOperation>('PUT', operationPath(id), { body: input })
    : request<LabourOperation>('POST', '/labour-operations', { body: input })
}

export function setOperationArchived(id: string, archived: boolean): Promise<LabourOperation> {
  return request<LabourOperation>('POST', `${operationPath(id)}/${archived ? 'archive' : 'restore'}`)
}

export function recordClockTime(operationId: string, input: ClockTimeInput): Promise<ClockTime> {
  return request<ClockTime>('POST', `${operationPath(operationId)}/clock-times`, { body: input })
}

export function getTimeComparison(system?: LabourSystem): Promise<{ items: TimeComparisonRow[] }> {
  return request<{ items: TimeComparisonRow[] }>('GET', `/labour-operations/time-comparison${queryString({ system })}`)
}

export function listAccessSteps(): Promise<{ items: AccessStep[] }> {
  return request<{ items: AccessStep[] }>('GET', '/access-steps')
}

/** Rejects with 422 naming a loop of steps, or a book time shorter than its access time. */
export function saveAccessStep(input: AccessStepInput, id?: string): Promise<AccessStep> {
  return id ? request<AccessStep>('PUT', stepPath(id), { body: input }) : request<AccessStep>('POST', '/access-steps', { body: input })
}

/** Rejects with 409 `in_use` while an operation or another step uses it. */
export function deleteAccessStep(id: string): Promise<void> {
  return request<void>('DELETE', stepPath(id))
}

export function searchParts(params: PartSearchQuery): Promise<Page<Part>> {
  return request<Page<Part>>('GET', `/parts${queryString(params)}`)
}

export function savePart(input: PartInput, id?: string): Promise<Part> {
  return id ? request<Part>('PUT', partPath(id), { body: input }) : request<Part>('POST', '/parts', { body: input })
}

export function setPartArchived(id: string, archived: boolean): Promise<Part> {
  return request<Part>('POST', `${partPath(id)}/${archived ? 'archive' : 'restore'}`)
}

export function getPricing(): Promise<Pricing> {
  return request<Pricing>('GET', '/pricing')
}

export function savePricing(input: PricingInput): Promise<Pricing> {
  return request<Pricing>('PUT', '/pricing', { body: input })
}

/** Checks a CSV file and says what it would change; writes nothing. */
export function checkImport(table: CatalogueTable, text: string, onProgress?: (fraction: number) => void): Promise<ImportReport> {
  return uploadCsv<ImportReport>(`/${table}/import/dry-run`, text, onProgress)
}

/** Writes the whole file or nothing: a file with problems is refused with 422 `import_has_errors`, issues as [row, column]. */
export function commitImport(table: CatalogueTable, text: string, onProgress?: (fraction: number) => void): Promise<ImportReport> {
  return uploadCsv<ImportReport>(`/${table}/import`, text, onProgress)
}

/** Plain links: the browser downloads them with the session cookie and the server's file name. */
export const exportUrl = (table: CatalogueTable) => `${API_BASE}/${table}/export`
export const templateUrl = (table: CatalogueTable) => `${API_BASE}/${table}/template`
