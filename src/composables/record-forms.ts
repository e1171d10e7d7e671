import { computed, ref } from 'vue'
import { type RouteLocationRaw, useRouter } from 'vue-router'
import type { ApiError } from '@/api/http'
import { useNotificationsStore } from '@/stores/notifications'

/** What a record store built on useRecordDetail (stores/record-list.ts) offers the pages' dialogs. */
export interface RecordStore<T, I> {
  current: T | null
  isLoadingCurrent: boolean
  currentError: ApiError | null
  isSaving: boolean
  isRemoving: boolean
  removeError: ApiError | null
  get(id: string): Promise<T | null>
  clearErrors(): void
  save(input: I, id?: string): Promise<T | null>
  archive(id: string): Promise<T | null>
  restore(id: string): Promise<T | null>
  remove(id: string): Promise<boolean>
}

/**
 * The dialog that adds a record: opened with the last errors cleared, closed once saved, with
 * `saidWhenSaved` as the notice and `afterSave` to go to the record or reload a list.
 */
export function useNewRecordForm<T, I>(
  store: Pick<RecordStore<T, I>, 'clearErrors' | 'save'>,
  saidWhenSaved: (saved: T) => string,
  afterSave: (saved: T) => Promise<unknown>,
) {
  const open = ref(false)

  function start(): void {
    store.clearErrors()
    open.value = true
  }

  async function save(input: I): Promise<void> {
    const saved = await store.save(input)
    if (!saved) return
    open.value = false
    useNotificationsStore().push('success', saidWhenSaved(saved))
    await afterSave(saved)
  }

  return { open, start, save }
}

/** The same, going to the new record's page (the route named `page`, with the record's id) once it is saved. */
export function useNewRecordPage<T extends { id: string }, I>(
  store: Pick<RecordStore<T, I>, 'clearErrors' | 'save'>,
  saidWhenSaved: (saved: T) => string,
  page: string,
) {
  const router = useRouter()
  return useNewRecordForm(store, saidWhenSaved, (saved) => router.push({ name: page, params: { id: saved.id } }))
}

export interface RecordWords<T> {
  /** How notices name the record: its name, its registration. */
  name: (record: T) => string
  /** Names it when it is no longer loaded: "The customer". */
  fallback: string
  /** Said after archiving: "Their history is kept." */
  historyKept: string
}

/**
 * A record page's edit, archive and delete dialogs for the record `id()`, with the notices each one
 * ends with, and what RecordDeleteDialog and RecordPageStatus show (`v-bind` them).
 */
export function useRecordDialogs<T extends { archived: boolean }, I>(
  store: RecordStore<T, I>,
  id: () => string,
  words: RecordWords<T>,
  listPage: RouteLocationRaw,
) {
  const notifications = useNotificationsStore()
  const router = useRouter()
  const editOpen = ref(false)
  const deleteOpen = ref(false)

  function edit(): void {
    store.clearErrors()
    editOpen.value = true
  }

  async function save(input: I): Promise<void> {
    if (!(await store.save(input, id()))) return
    editOpen.value = false
    notifications.push('success', 'Changes saved.')
  }

  async function setArchived(archived: boolean): Promise<boolean> {
    const saved = archived ? await store.archive(id()) : await store.restore(id())
    if (saved) {
      const name = words.name(saved)
      notifications.push('success', archived ? `${name} archived. ${words.historyKept}` : `${name} restored.`)
    }
    return Boolean(saved)
  }

  function askDelete(): void {
    store.clearErrors()
    deleteOpen.value = true
  }

  async function confirmDelete(): Promise<void> {
    const name = store.current ? words.name(store.current) : words.fallback
    if (!(await store.remove(id()))) return
    deleteOpen.value = false
    notifications.push('success', `${name} deleted.`)
    await router.push(listPage)
  }

  async function archiveInstead(): Promise<void> {
    if (await setArchived(true)) deleteOpen.value = false
  }

  const deleteDialog = computed(() => ({
    open: deleteOpen.value,
    'onUpdate:open': (open: boolean) => {
      deleteOpen.value = open
    },
    what: store.current ? words.name(store.current) : '',
    deleting: store.isRemoving,
    // Why the server would not delete it: something still points at it.
    refusal: store.removeError?.status === 409 ? store.removeError.message : null,
    alternativeLabel: store.current?.archived ? null : 'Archive instead',
    alternativeBusy: store.isSaving,
    onConfirm: confirmDelete,
    onAlternative: archiveInstead,
  }))

  /** Whether the record is still loading, was not found or did not load. */
  const pageStatus = computed(() => ({
    missing: store.currentError?.status === 404,
    loading: store.isLoadingCurrent,
    failed: Boolean(store.currentError),
    onRetry: () => void store.get(id()),
  }))

  return { editOpen, edit, save, setArchived, askDelete, deleteDialog, pageStatus }
}
