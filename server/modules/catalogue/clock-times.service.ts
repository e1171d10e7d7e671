import { NotFoundError } from '../../lib/errors'
import { normalizeDecimal } from '../../../shared/decimal'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { ClockTime, ClockTimeInput, TimeComparisonQuery, TimeComparisonRow } from '../../../shared/schemas/catalogue'
import type { LabourRepo } from './labour.repo'
import { noSuchOperation } from './labour.service'

/** The time technicians actually took, and how it compares with book time. */
export function createClockTimesService(deps: { repo: LabourRepo }) {
  const { repo } = deps
  return {
    async record(me: StaffPrincipal, operationId: string, input: ClockTimeInput): Promise<ClockTime> {
      const workshopId = me.workshop.id
      if (!(await repo.findOperation(workshopId, operationId))) throw noSuchOperation()
      if (input.jobId && !(await repo.jobExists(workshopId, input.jobId))) throw new NotFoundError('No such job in this workshop.')
      const row = await repo.insertClockTime({
        workshopId,
        operationId,
        jobId: input.jobId ?? null,
        technicianId: me.id,
        hours: input.hours,
      })
      return {
        id: row.id,
        operationId: row.operationId,
        jobId: row.jobId,
        technicianId: row.technicianId,
        hours: normalizeDecimal(row.hours),
        recordedAt: row.recordedAt.toISOString(),
      }
    },

    async comparison(workshopId: string, q: TimeComparisonQuery): Promise<TimeComparisonRow[]> {
      const rows = await repo.timeComparison(workshopId, q)
      return rows.map((r) => ({ ...r, bookHours: normalizeDecimal(r.bookHours), medianHours: normalizeDecimal(r.medianHours) }))
    },
  }
}

export type ClockTimesService = ReturnType<typeof createClockTimesService>
