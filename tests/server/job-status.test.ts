/**
 * The job status table (shared/schemas/records.ts) is the one definition of how a job moves: this walks
 * every pair of statuses through the jobs repo's setJobStatus and through the job page's PUT, and
 * expects exactly the moves the table allows to work. The table is our own product rule, not a trade
 * standard.
 */
import { eq } from 'drizzle-orm'
import { afterAll, describe, expect, it } from 'vitest'
import { jobs } from '../../server/db/schema'
import { setJobStatus } from '../../server/modules/jobs/jobs.repo'
import { canMoveJob, jobStatuses, jobTransitions, type JobStatus } from '../../shared/schemas/records'
import { makeTestApp } from './helpers/app'
import { makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
afterAll(() => t.close())

const pairs = jobStatuses.flatMap((from) => jobStatuses.map((to) => [from, to] as const))

async function statusOf(jobId: string): Promise<JobStatus | undefined> {
  const [row] = await t.db.select({ status: jobs.status }).from(jobs).where(eq(jobs.id, jobId))
  return row?.status
}

describe('the job status table', () => {
  it('names every status, never moves a job to where it already is as a listed move, and lets every status reach another', () => {
    expect(Object.keys(jobTransitions).sort()).toEqual([...jobStatuses].sort())
    for (const from of jobStatuses) {
      expect(jobTransitions[from]).not.toContain(from)
      expect(jobTransitions[from].length).toBeGreaterThan(0)
      for (const to of jobTransitions[from]) expect(jobStatuses).toContain(to)
    }
  })

  it('lets an open job be cancelled and a finished or cancelled one only be reopened', () => {
    for (const from of jobStatuses.filter((s) => s !== 'finished' && s !== 'cancelled')) expect(canMoveJob(from, 'cancelled')).toBe(true)
    expect(jobTransitions.finished).toEqual(['in_work'])
    expect(jobTransitions.cancelled).toEqual(['booked_in'])
  })
})

describe('setJobStatus', () => {
  it('makes every move the table allows and refuses every other, leaving the job as it was', async () => {
    const f = await makeWorkshop(t.db, 'Status Works')
    for (const [from, to] of pairs) {
      await t.db.update(jobs).set({ status: from }).where(eq(jobs.id, f.job.id))
      if (canMoveJob(from, to)) {
        await expect(setJobStatus(t.db, f.workshop.id, f.job.id, [from], to)).resolves.toBe(true)
        expect(await statusOf(f.job.id)).toBe(to)
      } else {
        await expect(setJobStatus(t.db, f.workshop.id, f.job.id, [from], to)).rejects.toThrow(`from ${from} to ${to}`)
        expect(await statusOf(f.job.id)).toBe(from)
      }
    }
  })

  it('moves only a job whose status is one of those named, and only in its own workshop', async () => {
    const f = await makeWorkshop(t.db, 'Status Works')
    const other = await makeWorkshop(t.db, 'Other Status Works')
    await t.db.update(jobs).set({ status: 'quoting' }).where(eq(jobs.id, f.job.id))
    await expect(setJobStatus(t.db, f.workshop.id, f.job.id, ['booked_in', 'inspecting'], 'in_work')).resolves.toBe(false)
    expect(await statusOf(f.job.id)).toBe('quoting')
    await expect(setJobStatus(t.db, other.workshop.id, f.job.id, ['quoting'], 'in_work')).resolves.toBe(false)
    expect(await statusOf(f.job.id)).toBe('quoting')
  })
})

describe('changing a job’s status on the job page', () => {
  it('saves every move the table allows and answers 422 on the status field for every other', async () => {
    const f = await makeWorkshop(t.db, 'Status Works')
    const advisor = await signIn(t.app, f.advisor.email)
    const body = { vehicleId: f.vehicle.id, concern: 'Knock on take-up of drive' }
    for (const [from, to] of pairs) {
      await t.db.update(jobs).set({ status: from }).where(eq(jobs.id, f.job.id))
      const res = await advisor.put(`/api/jobs/${f.job.id}`, { ...body, status: to })
      if (canMoveJob(from, to)) {
        expect(res.status, `${from} → ${to}`).toBe(200)
        expect(res.body.status).toBe(to)
      } else {
        expect(res.status, `${from} → ${to}`).toBe(422)
        expect(res.body.error.issues).toEqual([expect.objectContaining({ path: ['body', 'status'] })])
        expect(await statusOf(f.job.id)).toBe(from)
      }
    }
  })
})
