import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import * as catalogueApi from '@/api/catalogue'
import type { ApiError } from '@/api/http'
import type { CatalogueTable, ImportIssue, ImportReport } from '@shared/schemas/catalogue'
import { asApiError, reportFailure } from './report-failure'

export type ImportPhase = 'choose' | 'checking' | 'checked' | 'importing' | 'done'

/**
 * One CSV import at a time: send the file for a dry run, show its report, then send it again to
 * be written in one transaction. The server checks the file again on the second send.
 */
export const useCatalogueImportStore = defineStore('catalogue-import', () => {
  const table = ref<CatalogueTable | null>(null)
  const fileName = ref('')
  const text = ref('')
  const phase = ref<ImportPhase>('choose')
  /** Share of the file sent, 0 to 1, while sending. */
  const progress = ref(0)
  const report = ref<ImportReport | null>(null)
  const error = ref<ApiError | null>(null)

  /** A refused commit's issues read back as the dry run's rows and columns. */
  const problems = computed<ImportIssue[]>(() => {
    if (report.value && report.value.errors.length > 0) return report.value.errors
    if (error.value?.code !== 'import_has_errors') return []
    return error.value.issues.map((i) => ({ row: Number(i.path[0]), column: String(i.path[1] ?? '') || null, message: i.message }))
  })

  const canCommit = computed(
    () =>
      phase.value === 'checked' &&
      report.value !== null &&
      report.value.errors.length === 0 &&
      report.value.summary.added + report.value.summary.changed > 0,
  )

  function start(which: CatalogueTable): void {
    table.value = which
    fileName.value = ''
    text.value = ''
    phase.value = 'choose'
    progress.value = 0
    report.value = null
    error.value = null
  }

  async function send(kind: 'check' | 'commit'): Promise<void> {
    const which = table.value
    if (!which) return
    phase.value = kind === 'check' ? 'checking' : 'importing'
    progress.value = 0
    error.value = null
    try {
      const call = kind === 'check' ? catalogueApi.checkImport : catalogueApi.commitImport
      report.value = await call(which, text.value, (fraction) => {
        progress.value = fraction
      })
      phase.value = kind === 'check' ? 'checked' : 'done'
    } catch (cause) {
      // A refused commit is shown in the dialog with its rows; anything else is reported as usual.
      const failure = asApiError(cause)
      error.value = failure.code === 'import_has_errors' ? failure : reportFailure(failure)
      if (failure.code === 'import_has_errors') report.value = null
      phase.value = kind === 'check' ? 'choose' : 'checked'
    }
  }

  /** Checks the file; nothing is written yet. */
  async function check(name: string, content: string): Promise<void> {
    fileName.value = name
    text.value = content
    report.value = null
    await send('check')
  }

  return {
    table,
    fileName,
    phase,
    progress,
    report,
    error,
    problems,
    canCommit,
    start,
    check,
    commit: () => send('commit'),
    exportUrl: catalogueApi.exportUrl,
    templateUrl: catalogueApi.templateUrl,
  }
})
