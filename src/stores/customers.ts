import { defineStore } from 'pinia'
import * as customersApi from '@/api/customers'
import type { Customer, CustomerInput } from '@shared/schemas/records'
import { useRecordDetail, useRecordList } from './record-list'

export const useCustomersStore = defineStore('customers', () => {
  const list = useRecordList(customersApi.listCustomers, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'name', order: 'asc' }] },
    filters: { archived: false },
    sortKeys: ['name', 'createdAt'],
  })
  const detail = useRecordDetail<Customer, CustomerInput>(list.items, {
    get: customersApi.getCustomer,
    create: customersApi.createCustomer,
    update: customersApi.updateCustomer,
    remove: customersApi.deleteCustomer,
    archive: customersApi.archiveCustomer,
    restore: customersApi.restoreCustomer,
    search: async (q) => (await customersApi.listCustomers({ page: 1, pageSize: 20, sortBy: 'name', q: q || undefined })).items,
  })
  return { ...list, ...detail }
})
