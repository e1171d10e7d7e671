import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as catalogueApi from '@/api/catalogue'
import type { ApiError } from '@/api/http'
import type {
  AccessStep,
  AccessStepInput,
  ClockTimeInput,
  LabourOperation,
  LabourOperationInput,
  LabourSearchQuery,
  LabourSide,
  LabourSystem,
  TimeComparisonRow,
} from '@shared/schemas/catalogue'
import type { Page } from '@shared/schemas/common'
import { attempt, useRecordList } from './record-list'
import { reportFailure } from './report-failure'

export interface LabourFilters {
  archived: boolean
  system?: LabourSystem
  vehicleGroup?: string
  side?: LabourSide
}

/** The labour-time table: the lookup, the list of operations, access steps and the clock-time comparison. */
export const useLabourStore = defineStore('labour', () => {
  // The server lists by code, or by relevance when searching; there is nothing to sort by here.
  const list = useRecordList((params) => catalogueApi.searchLabour(params), {
    options: { page: 1, itemsPerPage: 25, sortBy: [] },
    filters: { archived: false } as LabourFilters,
    sortKeys: [] as const,
  })

  const isSaving = ref(false)
  /** A 422 here carries the issues the operation form shows on its fields; a 409 a taken code. */
  const saveError = ref<ApiError | null>(null)

  const steps = ref<AccessStep[]>([])
  const isLoadingSteps = ref(false)
  const stepsError = ref<ApiError | null>(null)
  const isSavingStep = ref(false)
  const stepError = ref<ApiError | null>(null)

  const comparison = ref<TimeComparisonRow[]>([])
  const isLoadingComparison = ref(false)
  const comparisonError = ref<ApiError | null>(null)

  /**
   * One lookup request for a lookup component, which keeps its own results so that two lookups on
   * one screen do not share them. Null when it failed; the failure is reported here.
   */
  async function lookup(params: LabourSearchQuery): Promise<Page<LabourOperation> | null> {
    try {
      return await catalogueApi.searchLabour(params)
    } catch (cause) {
      reportFailure(cause)
      return null
    }
  }

  function replace(op: LabourOperation): LabourOperation {
    list.items.value = list.items.value.map((o) => (o.id === op.id ? op : o))
    return op
  }

  async function save(input: LabourOperationInput, id?: string): Promise<LabourOperation | null> {
    let saved: LabourOperation | null = null
    await attempt(isSaving, saveError, async () => {
      saved = replace(await catalogueApi.saveOperation(input, id))
    })
    return saved
  }

  async function setArchived(id: string, archived: boolean): Promise<LabourOperation | null> {
    let saved: LabourOperation | null = null
    await attempt(isSaving, saveError, async () => {
      saved = await catalogueApi.setOperationArchived(id, archived)
      // It moves between the current and the archived list.
      list.items.value = list.items.value.filter((o) => o.id !== id)
    })
    return saved
  }

  async function loadSteps(): Promise<void> {
    await attempt(isLoadingSteps, stepsError, async () => {
      steps.value = (await catalogueApi.listAccessSteps()).items
    })
  }

  async function saveStep(input: AccessStepInput, id?: string): Promise<AccessStep | null> {
    let saved: AccessStep | null = null
    const ok = await attempt(isSavingStep, stepError, async () => {
      saved = await catalogueApi.saveAccessStep(input, id)
    })
    // Totals of the steps that include this one change too.
    if (ok) await loadSteps()
    return saved
  }

  async function removeStep(id: string): Promise<boolean> {
    const ok = await attempt(isSavingStep, stepError, () => catalogueApi.deleteAccessStep(id))
    if (ok) steps.value = steps.value.filter((s) => s.id !== id)
    return ok
  }

  async function loadComparison(system?: LabourSystem): Promise<void> {
    await attempt(isLoadingComparison, comparisonError, async () => {
      comparison.value = (await catalogueApi.getTimeComparison(system)).items
    })
  }

  /** For the inspection and work screens: the time a finished operation really took. */
  async function recordClockTime(operationId: string, input: ClockTimeInput): Promise<boolean> {
    return attempt(isSaving, saveError, async () => {
      await catalogueApi.recordClockTime(operationId, input)
    })
  }

  function clearErrors(): void {
    saveError.value = null
    stepError.value = null
  }

  return {
    ...list,
    isSaving,
    saveError,
    steps,
    isLoadingSteps,
    stepsError,
    isSavingStep,
    stepError,
    comparison,
    isLoadingComparison,
    comparisonError,
    lookup,
    save,
    archive: (id: string) => setArchived(id, true),
    restore: (id: string) => setArchived(id, false),
    loadSteps,
    saveStep,
    removeStep,
    loadComparison,
    recordClockTime,
    clearErrors,
  }
})
