import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { checkImport, commitImport, deleteAccessStep, listAccessSteps, saveAccessStep, searchLabour } from '@/api/catalogue'
import { ApiError } from '@/api/http'
import { useCatalogueImportStore } from '@/stores/catalogue-import'
import { useLabourStore } from '@/stores/labour'
import { useNotificationsStore } from '@/stores/notifications'
import type { AccessStep, ImportReport } from '@shared/schemas/catalogue'

vi.mock('@/api/catalogue', () => ({
  checkImport: vi.fn(),
  commitImport: vi.fn(),
  searchLabour: vi.fn(),
  listAccessSteps: vi.fn(),
  saveAccessStep: vi.fn(),
  deleteAccessStep: vi.fn(),
  exportUrl: (t: string) => `/api/${t}/export`,
  templateUrl: (t: string) => `/api/${t}/template`,
}))

const csvText = 'code,name,hours,includes\r\nHUB,Hub off,1,\r\n'

function report(overrides: Partial<ImportReport> = {}): ImportReport {
  return {
    rows: [{ row: 2, key: 'HUB', action: 'add', changed: [] }],
    errors: [],
    summary: { added: 1, changed: 0, unchanged: 0 },
    committed: false,
    ...overrides,
  }
}

const step = (code: string): AccessStep => ({
  id: `00000000-0000-4000-8000-00000000000${code.length}`,
  code,
  name: code,
  hours: '1',
  includes: [],
  totalHours: '1',
  usedBy: 0,
})

beforeEach(() => {
  setActivePinia(createPinia())
  vi.mocked(checkImport).mockReset()
  vi.mocked(commitImport).mockReset()
  vi.mocked(searchLabour).mockReset()
  vi.mocked(listAccessSteps).mockReset()
  vi.mocked(saveAccessStep).mockReset()
  vi.mocked(deleteAccessStep).mockReset()
})

describe('useCatalogueImportStore', () => {
  it('checks the file first, reporting upload progress, and only then allows the import', async () => {
    vi.mocked(checkImport).mockImplementation(async (_table, _text, onProgress) => {
      onProgress?.(0.5)
      expect(useCatalogueImportStore().progress).toBe(0.5)
      expect(useCatalogueImportStore().phase).toBe('checking')
      return report()
    })
    const importer = useCatalogueImportStore()
    importer.start('access-steps')
    expect(importer.canCommit).toBe(false)

    await importer.check('steps.csv', csvText)

    expect(checkImport).toHaveBeenCalledWith('access-steps', csvText, expect.any(Function))
    expect(commitImport).not.toHaveBeenCalled()
    expect(importer.phase).toBe('checked')
    expect(importer.canCommit).toBe(true)
  })

  it('sends the same text again to commit, and ends done', async () => {
    vi.mocked(checkImport).mockResolvedValue(report())
    vi.mocked(commitImport).mockResolvedValue(report({ committed: true }))
    const importer = useCatalogueImportStore()
    importer.start('access-steps')
    await importer.check('steps.csv', csvText)
    await importer.commit()

    expect(commitImport).toHaveBeenCalledWith('access-steps', csvText, expect.any(Function))
    expect(importer.phase).toBe('done')
    expect(importer.report?.committed).toBe(true)
  })

  it('does not allow an import while the dry run found problems', async () => {
    vi.mocked(checkImport).mockResolvedValue(
      report({
        errors: [{ row: 3, column: 'hours', message: 'Write the hours as a number' }],
        summary: { added: 1, changed: 0, unchanged: 0 },
      }),
    )
    const importer = useCatalogueImportStore()
    importer.start('access-steps')
    await importer.check('steps.csv', csvText)

    expect(importer.canCommit).toBe(false)
    expect(importer.problems).toEqual([{ row: 3, column: 'hours', message: 'Write the hours as a number' }])
  })

  it('does not offer an import that would change nothing', async () => {
    vi.mocked(checkImport).mockResolvedValue(
      report({ rows: [{ row: 2, key: 'HUB', action: 'keep', changed: [] }], summary: { added: 0, changed: 0, unchanged: 1 } }),
    )
    const importer = useCatalogueImportStore()
    importer.start('access-steps')
    await importer.check('steps.csv', csvText)
    expect(importer.canCommit).toBe(false)
  })

  it('shows a refused commit’s rows and columns as problems, without a pop-up', async () => {
    vi.mocked(checkImport).mockResolvedValue(report())
    vi.mocked(commitImport).mockRejectedValue(
      new ApiError(422, 'import_has_errors', 'The file has problems, so nothing was imported.', [
        { path: [2, 'includes'], message: 'Access steps cannot include each other in a loop: A → B → A.' },
      ]),
    )
    const importer = useCatalogueImportStore()
    importer.start('access-steps')
    await importer.check('steps.csv', csvText)
    await importer.commit()

    expect(importer.phase).toBe('checked')
    expect(importer.canCommit).toBe(false)
    expect(importer.problems).toEqual([
      { row: 2, column: 'includes', message: 'Access steps cannot include each other in a loop: A → B → A.' },
    ])
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('reports a connection failure and lets the file be chosen again', async () => {
    vi.mocked(checkImport).mockRejectedValue(new ApiError(0, 'network_error', 'The file could not be sent.'))
    const importer = useCatalogueImportStore()
    importer.start('parts')
    await importer.check('parts.csv', 'part_number\r\n')

    expect(importer.phase).toBe('choose')
    expect(importer.error?.code).toBe('network_error')
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: 'The file could not be sent.' }])
  })

  it('starts clean for each import', async () => {
    vi.mocked(checkImport).mockResolvedValue(report())
    const importer = useCatalogueImportStore()
    importer.start('access-steps')
    await importer.check('steps.csv', csvText)
    importer.start('parts')
    expect(importer).toMatchObject({ table: 'parts', phase: 'choose', report: null, fileName: '', progress: 0 })
  })
})

describe('useLabourStore', () => {
  it('gives a lookup its own results and reports a failure once', async () => {
    vi.mocked(searchLabour).mockRejectedValue(new ApiError(503, 'not_ready', 'The database cannot be reached right now.'))
    const labour = useLabourStore()
    expect(await labour.lookup({ q: 'uj', page: 1, pageSize: 8 })).toBeNull()
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: 'The database cannot be reached right now.' }])
    expect(labour.items).toEqual([])
  })

  it('reloads the steps after saving one, since totals of the steps that include it change', async () => {
    vi.mocked(saveAccessStep).mockResolvedValue(step('HUB'))
    vi.mocked(listAccessSteps).mockResolvedValue({ items: [step('HUB'), step('WHEEL')] })
    const labour = useLabourStore()
    const saved = await labour.saveStep({ code: 'HUB', name: 'Hub', hours: '1', includes: ['WHEEL'] })
    expect(saved?.code).toBe('HUB')
    expect(listAccessSteps).toHaveBeenCalledTimes(1)
    expect(labour.steps.map((s) => s.code)).toEqual(['HUB', 'WHEEL'])
  })

  it('keeps a refused loop as the form’s problem rather than a pop-up', async () => {
    const loop = new ApiError(422, 'validation_failed', 'Some of the details are not right.', [
      { path: ['body', 'includes'], message: 'Access steps cannot include each other in a loop: A → B → A.' },
    ])
    vi.mocked(saveAccessStep).mockRejectedValue(loop)
    const labour = useLabourStore()
    expect(await labour.saveStep({ code: 'A', name: 'A', hours: '1', includes: ['B'] }, 'x')).toBeNull()
    expect(labour.stepError).toBe(loop)
    expect(listAccessSteps).not.toHaveBeenCalled()
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('keeps a step that is in use, and says why', async () => {
    vi.mocked(listAccessSteps).mockResolvedValue({ items: [step('HUB')] })
    vi.mocked(deleteAccessStep).mockRejectedValue(new ApiError(409, 'in_use', 'Operations or other access steps use this step.'))
    const labour = useLabourStore()
    await labour.loadSteps()
    expect(await labour.removeStep(step('HUB').id)).toBe(false)
    expect(labour.steps).toHaveLength(1)
    expect(labour.stepError?.code).toBe('in_use')
  })
})
