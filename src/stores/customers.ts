import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as customersApi from '@/api/customers'
import type { ApiError } from '@/api/http'
import type { Customer, CustomerInput } from '@shared/schemas/records'
import { attempt, useRecordList } from './record-list'

export const useCustomersStore = defineStore('customers', () => {
  const list = useRecordList(customersApi.listCustomers, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'name', order: 'asc' }] },
    filters: { archived: false },
    sortKeys: ['name', 'createdAt'],
  })

  /** The customer a detail page shows. */
  const current = ref<Customer | null>(null)
  const isLoadingCurrent = ref(false)
  const currentError = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries the issues a form shows on its fields. */
  const saveError = ref<ApiError | null>(null)
  const isRemoving = ref(false)
  /** A 409 `in_use` here carries the message the delete dialog shows. */
  const removeError = ref<ApiError | null>(null)
  /** Matches for a keeper picker, kept apart from the list so searching there leaves the table alone. */
  const matches = ref<Customer[]>([])
  const isSearching = ref(false)
  const searchError = ref<ApiError | null>(null)

  function show(customer: Customer): Customer {
    current.value = customer
    list.items.value = list.items.value.map((c) => (c.id === customer.id ? customer : c))
    return customer
  }

  async function get(id: string): Promise<Customer | null> {
    if (current.value?.id !== id) current.value = null
    // The page says "We can't find that …" itself.
    const ok = await attempt(
      isLoadingCurrent,
      currentError,
      async () => {
        show(await customersApi.getCustomer(id))
      },
      [404],
    )
    return ok ? current.value : null
  }

  /** Creates when there is no id; returns the saved customer, or null with `saveError` set. */
  async function save(input: CustomerInput, id?: string): Promise<Customer | null> {
    let saved: Customer | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(id ? await customersApi.updateCustomer(id, input) : await customersApi.createCustomer(input))
    })
    return saved
  }

  async function setArchived(id: string, archived: boolean): Promise<Customer | null> {
    let saved: Customer | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(archived ? await customersApi.archiveCustomer(id) : await customersApi.restoreCustomer(id))
    })
    return saved
  }

  async function remove(id: string): Promise<boolean> {
    const ok = await attempt(isRemoving, removeError, () => customersApi.deleteCustomer(id))
    if (ok) {
      if (current.value?.id === id) current.value = null
      list.items.value = list.items.value.filter((c) => c.id !== id)
    }
    return ok
  }

  async function lookup(q: string): Promise<void> {
    await attempt(isSearching, searchError, async () => {
      matches.value = (await customersApi.listCustomers({ page: 1, pageSize: 20, sortBy: 'name', q: q.trim() || undefined })).items
    })
  }

  function clearErrors(): void {
    saveError.value = null
    removeError.value = null
  }

  return {
    ...list,
    current,
    isLoadingCurrent,
    currentError,
    isSaving,
    saveError,
    isRemoving,
    removeError,
    matches,
    isSearching,
    get,
    save,
    archive: (id: string) => setArchived(id, true),
    restore: (id: string) => setArchived(id, false),
    remove,
    lookup,
    clearErrors,
  }
})
