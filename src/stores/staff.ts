import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as staffApi from '@/api/staff'
import type { StaffRole } from '@shared/auth/policy'
import type { InviteStaff, StaffMember } from '@shared/schemas/staff'
import { useAuthStore } from './auth'
import { reportFailure } from './report-failure'

export const useStaffStore = defineStore('staff', () => {
  const items = ref<StaffMember[]>([])
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  /** The member a change is being saved for, so only that row shows it is busy. */
  const savingId = ref<string | null>(null)
  const isInviting = ref(false)
  const error = ref<ApiError | null>(null)

  function replace(member: StaffMember): void {
    items.value = items.value.map((m) => (m.id === member.id ? member : m))
  }

  async function load(): Promise<void> {
    isLoading.value = true
    error.value = null
    try {
      items.value = await staffApi.listStaff()
      hasLoaded.value = true
    } catch (cause) {
      error.value = reportFailure(cause)
    } finally {
      isLoading.value = false
    }
  }

  async function invite(input: InviteStaff): Promise<StaffMember | null> {
    isInviting.value = true
    error.value = null
    try {
      const member = await staffApi.inviteStaff(input)
      items.value = [...items.value, member]
      return member
    } catch (cause) {
      error.value = reportFailure(cause)
      return null
    } finally {
      isInviting.value = false
    }
  }

  async function save(id: string, call: () => Promise<StaffMember>): Promise<boolean> {
    savingId.value = id
    error.value = null
    try {
      replace(await call())
      return true
    } catch (cause) {
      error.value = reportFailure(cause)
      return false
    } finally {
      savingId.value = null
    }
  }

  async function changeRole(id: string, role: StaffRole): Promise<boolean> {
    const saved = await save(id, () => staffApi.changeStaffRole(id, role))
    // Changing your own role changes what the app may show you.
    const auth = useAuthStore()
    if (saved && auth.staff?.id === id) await auth.refresh()
    return saved
  }

  function deactivate(id: string): Promise<boolean> {
    return save(id, () => staffApi.deactivateStaff(id))
  }

  function reactivate(id: string): Promise<boolean> {
    return save(id, () => staffApi.reactivateStaff(id))
  }

  return { items, hasLoaded, isLoading, savingId, isInviting, error, load, invite, changeRole, deactivate, reactivate }
})
