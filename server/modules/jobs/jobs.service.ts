import { deleteOrRefuse } from '../../lib/db-errors'
import { type ErrorIssue, NotFoundError, ValidationError } from '../../lib/errors'
import type { Page } from '../../../shared/schemas/common'
import { canMoveJob, jobStatusLabels, jobTransitions, type Job, type JobInput, type JobListQuery } from '../../../shared/schemas/records'
import type { JobsRepo } from './jobs.repo'

type Found = NonNullable<Awaited<ReturnType<JobsRepo['find']>>>

const toJob = (f: Found): Job => ({
  id: f.row.id,
  vehicleId: f.row.vehicleId,
  registration: f.registration,
  vehicleDescription: f.vehicleDescription,
  customerId: f.customerId,
  customerName: f.customerName,
  concern: f.row.concern,
  status: f.row.status,
  technicianId: f.row.technicianId,
  technicianName: f.technicianName,
  bookedFor: f.row.bookedFor,
  promisedFor: f.row.promisedFor,
  createdAt: f.row.createdAt.toISOString(),
  updatedAt: f.row.updatedAt.toISOString(),
})

const notFound = () => new NotFoundError('No such job in this workshop.')

export function createJobsService(repo: JobsRepo) {
  async function get(workshopId: string, id: string) {
    const found = await repo.find(workshopId, id)
    if (!found) throw notFound()
    return toJob(found)
  }
  /** `assigned` is the job's current technician: someone who has since left may stay on the jobs they did. */
  async function checkRefs(workshopId: string, input: JobInput, assigned: string | null = null) {
    const issues: ErrorIssue[] = []
    if (!(await repo.vehicleExists(workshopId, input.vehicleId)))
      issues.push({ path: ['body', 'vehicleId'], message: 'Choose a vehicle of this workshop' })
    if (input.technicianId && input.technicianId !== assigned && !(await repo.activeStaffExists(workshopId, input.technicianId))) {
      issues.push({ path: ['body', 'technicianId'], message: 'Choose an active member of this workshop' })
    }
    if (issues.length) throw new ValidationError('Some of the details are not right. Please check the highlighted fields.', issues)
  }
  return {
    async list(workshopId: string, q: JobListQuery): Promise<Page<Job>> {
      const { items, total } = await repo.list(workshopId, q)
      return { items: items.map(toJob), total, page: q.page, pageSize: q.pageSize }
    },
    get,
    async create(workshopId: string, input: JobInput) {
      await checkRefs(workshopId, input)
      return get(workshopId, (await repo.insert(workshopId, input)).id)
    },
    async update(workshopId: string, id: string, input: JobInput) {
      const current = await repo.find(workshopId, id)
      if (!current) throw notFound()
      await checkRefs(workshopId, input, current.row.technicianId)
      const from = current.row.status
      if (!canMoveJob(from, input.status)) {
        const allowed = jobTransitions[from].map((t) => jobStatusLabels[t])
        throw new ValidationError('Some of the details are not right. Please check the highlighted fields.', [
          {
            path: ['body', 'status'],
            message: `A job that is “${jobStatusLabels[from]}” can move only to ${allowed.map((l) => `“${l}”`).join(' or ')}`,
          },
        ])
      }
      // PUT replaces the job: a date or technician left out is cleared, not kept (drizzle skips undefined),
      // which also keeps an old booking date from tripping the promised-after-booked check.
      const values = {
        ...input,
        technicianId: input.technicianId ?? null,
        bookedFor: input.bookedFor ?? null,
        promisedFor: input.promisedFor ?? null,
      }
      if (!(await repo.update(workshopId, id, values))) throw notFound()
      return get(workshopId, id)
    },
    async remove(workshopId: string, id: string) {
      const removed = await deleteOrRefuse(
        () => repo.remove(workshopId, id),
        'This job has an inspection or estimate on record, so it cannot be deleted. Set its status to Cancelled instead.',
      )
      if (!removed) throw notFound()
    },
  }
}

export type JobsService = ReturnType<typeof createJobsService>
