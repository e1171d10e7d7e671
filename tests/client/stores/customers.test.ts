import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import {
  archiveCustomer,
  createCustomer,
  deleteCustomer,
  getCustomer,
  listCustomers,
  restoreCustomer,
  updateCustomer,
} from '@/api/customers'
import { ApiError } from '@/api/http'
import { useCustomersStore } from '@/stores/customers'
import { useNotificationsStore } from '@/stores/notifications'
import type { CustomerInput } from '@shared/schemas/records'
import { customer, deferred, page, testIds } from '../support/records'

vi.mock('@/api/customers', () => ({
  listCustomers: vi.fn(),
  getCustomer: vi.fn(),
  createCustomer: vi.fn(),
  updateCustomer: vi.fn(),
  archiveCustomer: vi.fn(),
  restoreCustomer: vi.fn(),
  deleteCustomer: vi.fn(),
}))

const serverDown = new ApiError(503, 'not_ready', 'The database cannot be reached right now.')
const input: CustomerInput = {
  name: 'Maris Fenwick',
  email: 'maris@fenwick.test',
  phone: null,
  addressLines: [],
  postcode: null,
  contactByEmail: true,
  contactByPhone: false,
  contactBySms: false,
}

beforeEach(() => {
  setActivePinia(createPinia())
  for (const fn of [listCustomers, getCustomer, createCustomer, updateCustomer, archiveCustomer, restoreCustomer, deleteCustomer])
    vi.mocked(fn).mockReset()
})

describe('the customers list', () => {
  it('asks for the first page sorted by name and keeps what the server answers', async () => {
    vi.mocked(listCustomers).mockResolvedValue(page([customer()], 31))
    const customers = useCustomersStore()

    const loading = customers.load()
    expect(customers.isLoading).toBe(true)
    await loading

    expect(listCustomers).toHaveBeenCalledWith({ archived: false, page: 1, pageSize: 25, sortBy: 'name', sortDesc: false, q: undefined })
    expect(customers.items).toEqual([customer()])
    expect(customers.total).toBe(31)
    expect(customers.isLoading).toBe(false)
    expect(customers.error).toBeNull()
  })

  it('passes the table’s page, page size and sort on, and does not ask again for the same options', async () => {
    vi.mocked(listCustomers).mockResolvedValue(page([], 0))
    const customers = useCustomersStore()

    await customers.setOptions({ page: 3, itemsPerPage: 50, sortBy: [{ key: 'createdAt', order: 'desc' }] })
    await customers.setOptions({ page: 3, itemsPerPage: 50, sortBy: [{ key: 'createdAt', order: 'desc' }] })

    expect(listCustomers).toHaveBeenCalledOnce()
    expect(listCustomers).toHaveBeenCalledWith(expect.objectContaining({ page: 3, pageSize: 50, sortBy: 'createdAt', sortDesc: true }))
  })

  it('sends no sort the server does not know', async () => {
    vi.mocked(listCustomers).mockResolvedValue(page([], 0))
    const customers = useCustomersStore()

    await customers.setOptions({ page: 1, itemsPerPage: 25, sortBy: [{ key: 'vehicleCount', order: 'asc' }] })

    expect(listCustomers).toHaveBeenCalledWith(expect.objectContaining({ sortBy: undefined, sortDesc: undefined }))
  })

  it('goes back to the first page for a new search or filter', async () => {
    vi.mocked(listCustomers).mockResolvedValue(page([], 0))
    const customers = useCustomersStore()
    await customers.setOptions({ page: 4, itemsPerPage: 25, sortBy: [{ key: 'name', order: 'asc' }] })

    await customers.setSearch('  fenwick ')
    expect(listCustomers).toHaveBeenLastCalledWith(expect.objectContaining({ page: 1, q: 'fenwick' }))

    await customers.setOptions({ page: 2, itemsPerPage: 25, sortBy: [{ key: 'name', order: 'asc' }] })
    await customers.setFilters({ archived: true })
    expect(listCustomers).toHaveBeenLastCalledWith(expect.objectContaining({ page: 1, q: 'fenwick', archived: true }))
  })

  it('shows only the newest search’s answer when an older one arrives late', async () => {
    const slow = deferred<ReturnType<typeof page<ReturnType<typeof customer>>>>()
    vi.mocked(listCustomers)
      .mockReturnValueOnce(slow.promise)
      .mockResolvedValueOnce(page([customer({ name: 'Fenella Brook' })], 1))
    const customers = useCustomersStore()

    const first = customers.setSearch('fen')
    await customers.setSearch('fenella')
    slow.resolve(page([customer()], 1))
    await first

    expect(customers.items.map((c) => c.name)).toEqual(['Fenella Brook'])
    expect(customers.isLoading).toBe(false)
  })

  it('keeps the failure and tells the person when the list cannot be loaded', async () => {
    vi.mocked(listCustomers).mockRejectedValue(serverDown)
    const customers = useCustomersStore()

    await customers.load()

    expect(customers.error).toBe(serverDown)
    expect(customers.isLoading).toBe(false)
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: 'The database cannot be reached right now.' }])
  })
})

describe('one customer', () => {
  it('loads a customer for its page', async () => {
    vi.mocked(getCustomer).mockResolvedValue(customer())
    const customers = useCustomersStore()

    await expect(customers.get(testIds.customer)).resolves.toEqual(customer())
    expect(customers.current).toEqual(customer())
  })

  it('keeps a 404 for the page to explain, without a notification', async () => {
    vi.mocked(getCustomer).mockRejectedValue(new ApiError(404, 'not_found', 'No such customer in this workshop.'))
    const customers = useCustomersStore()

    await expect(customers.get(testIds.customer)).resolves.toBeNull()
    expect(customers.currentError?.status).toBe(404)
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('creates without an id and updates with one, refreshing the row in the list', async () => {
    vi.mocked(listCustomers).mockResolvedValue(page([customer()], 1))
    vi.mocked(createCustomer).mockResolvedValue(customer({ id: testIds.otherCustomer, name: 'Ives Marlow' }))
    vi.mocked(updateCustomer).mockResolvedValue(customer({ name: 'Maris Fenwick-Hale' }))
    const customers = useCustomersStore()
    await customers.load()

    expect((await customers.save(input))?.name).toBe('Ives Marlow')
    expect(createCustomer).toHaveBeenCalledWith(input)
    expect((await customers.save(input, testIds.customer))?.name).toBe('Maris Fenwick-Hale')
    expect(updateCustomer).toHaveBeenCalledWith(testIds.customer, input)
    expect(customers.items.map((c) => c.name)).toEqual(['Maris Fenwick-Hale'])
    expect(customers.current?.name).toBe('Maris Fenwick-Hale')
  })

  it('keeps a 422 with its issues for the form, without a notification', async () => {
    const invalid = new ApiError(422, 'validation_failed', 'Some of the details are not right.', [
      { path: ['body', 'email'], message: 'Enter an e-mail address or a phone number' },
    ])
    vi.mocked(createCustomer).mockRejectedValue(invalid)
    const customers = useCustomersStore()

    await expect(customers.save(input)).resolves.toBeNull()

    expect(customers.saveError).toBe(invalid)
    expect(customers.isSaving).toBe(false)
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('archives and restores', async () => {
    vi.mocked(archiveCustomer).mockResolvedValue(customer({ archived: true }))
    vi.mocked(restoreCustomer).mockResolvedValue(customer({ archived: false }))
    const customers = useCustomersStore()

    expect((await customers.archive(testIds.customer))?.archived).toBe(true)
    expect(customers.current?.archived).toBe(true)
    expect((await customers.restore(testIds.customer))?.archived).toBe(false)
    expect(archiveCustomer).toHaveBeenCalledWith(testIds.customer)
    expect(restoreCustomer).toHaveBeenCalledWith(testIds.customer)
  })

  it('keeps a refusal to delete (409) for the dialog, and the customer in the list', async () => {
    const inUse = new ApiError(
      409,
      'in_use',
      'This customer has vehicles or jobs on record, so they cannot be deleted. Archive them instead.',
    )
    vi.mocked(listCustomers).mockResolvedValue(page([customer()], 1))
    vi.mocked(deleteCustomer).mockRejectedValue(inUse)
    const customers = useCustomersStore()
    await customers.load()

    await expect(customers.remove(testIds.customer)).resolves.toBe(false)

    expect(customers.removeError).toBe(inUse)
    expect(customers.items).toHaveLength(1)
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('drops a deleted customer from the list', async () => {
    vi.mocked(listCustomers).mockResolvedValue(page([customer()], 1))
    vi.mocked(deleteCustomer).mockResolvedValue(undefined)
    const customers = useCustomersStore()
    await customers.load()

    await expect(customers.remove(testIds.customer)).resolves.toBe(true)

    expect(customers.items).toEqual([])
    expect(customers.removeError).toBeNull()
  })

  it('looks keepers up without touching the table', async () => {
    vi.mocked(listCustomers)
      .mockResolvedValueOnce(page([customer()], 1))
      .mockResolvedValueOnce(page([customer({ name: 'Ives Marlow' })], 1))
    const customers = useCustomersStore()
    await customers.load()

    await customers.lookup(' ives ')

    expect(listCustomers).toHaveBeenLastCalledWith({ page: 1, pageSize: 20, sortBy: 'name', q: 'ives' })
    expect(customers.matches.map((c) => c.name)).toEqual(['Ives Marlow'])
    expect(customers.items.map((c) => c.name)).toEqual(['Maris Fenwick'])
  })
})
