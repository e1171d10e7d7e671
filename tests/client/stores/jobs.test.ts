import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import { createJob, deleteJob, getJob, listJobs, updateJob } from '@/api/jobs'
import { useJobsStore } from '@/stores/jobs'
import { useNotificationsStore } from '@/stores/notifications'
import type { JobInput } from '@shared/schemas/records'
import { job, page, testIds } from '../support/records'

vi.mock('@/api/jobs', () => ({ listJobs: vi.fn(), getJob: vi.fn(), createJob: vi.fn(), updateJob: vi.fn(), deleteJob: vi.fn() }))

const input: JobInput = { vehicleId: testIds.vehicle, concern: 'Clunk from the back when pulling away', status: 'booked_in' }

beforeEach(() => {
  setActivePinia(createPinia())
  for (const fn of [listJobs, getJob, createJob, updateJob, deleteJob]) vi.mocked(fn).mockReset()
})

describe('useJobsStore', () => {
  it('lists the newest jobs first, and filters by status and technician', async () => {
    vi.mocked(listJobs).mockResolvedValue(page([job()], 1))
    const jobs = useJobsStore()

    await jobs.load()
    expect(listJobs).toHaveBeenLastCalledWith({ page: 1, pageSize: 25, sortBy: 'createdAt', sortDesc: true, q: undefined })

    await jobs.setFilters({ status: 'waiting_for_customer' })
    await jobs.setFilters({ technicianId: testIds.customer })
    expect(listJobs).toHaveBeenLastCalledWith(
      expect.objectContaining({ status: 'waiting_for_customer', technicianId: testIds.customer, page: 1 }),
    )

    await jobs.setFilters({ status: undefined })
    expect(listJobs).toHaveBeenLastCalledWith(expect.objectContaining({ status: undefined }))
  })

  it('loads a vehicle’s jobs apart from the list', async () => {
    vi.mocked(listJobs).mockResolvedValue(page([job()], 1))
    const jobs = useJobsStore()

    await jobs.loadHistory(testIds.vehicle)

    expect(listJobs).toHaveBeenCalledWith({ vehicleId: testIds.vehicle, page: 1, pageSize: 50 })
    expect(jobs.history).toEqual({ vehicleId: testIds.vehicle, items: [job()], total: 1 })
  })

  it('keeps a 422 for the form and a 409 for the delete dialog, queuing neither', async () => {
    vi.mocked(createJob).mockRejectedValue(
      new ApiError(422, 'validation_failed', 'Some of the details are not right.', [
        { path: ['body', 'promisedFor'], message: 'The promised date cannot be before the booking date' },
      ]),
    )
    vi.mocked(deleteJob).mockRejectedValue(
      new ApiError(409, 'in_use', 'This job has an inspection or estimate on record, so it cannot be deleted.'),
    )
    const jobs = useJobsStore()

    await expect(jobs.save(input)).resolves.toBeNull()
    await expect(jobs.remove(testIds.job)).resolves.toBe(false)

    expect(jobs.saveError?.issues[0]?.path).toEqual(['body', 'promisedFor'])
    expect(jobs.removeError?.code).toBe('in_use')
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('replaces the job in the list once saved', async () => {
    vi.mocked(listJobs).mockResolvedValue(page([job()], 1))
    vi.mocked(updateJob).mockResolvedValue(job({ status: 'inspecting' }))
    const jobs = useJobsStore()
    await jobs.load()

    await jobs.save({ ...input, status: 'inspecting' }, testIds.job)

    expect(updateJob).toHaveBeenCalledWith(testIds.job, { ...input, status: 'inspecting' })
    expect(jobs.items[0]?.status).toBe('inspecting')
    expect(jobs.current?.status).toBe('inspecting')
  })

  it('forgets the job on another page while the next one loads', async () => {
    vi.mocked(getJob)
      .mockResolvedValueOnce(job())
      .mockRejectedValueOnce(new ApiError(404, 'not_found', 'No such job in this workshop.'))
    const jobs = useJobsStore()
    await jobs.get(testIds.job)

    await jobs.get(testIds.vehicle)

    expect(jobs.current).toBeNull()
    expect(jobs.currentError?.status).toBe(404)
  })
})
