/**
 * An estimate's status is one rule written twice: estimateStatusOf in TypeScript (the portal) and
 * estimateStatusSql (lists that filter and sort on it). These run the SQL on every combination of the
 * facts it is decided from and expect the TypeScript answer each time.
 */
import { sql } from 'drizzle-orm'
import { afterAll, describe, expect, it } from 'vitest'
import { estimateStatusSql, linkExpiresAtSql, versionExpiredSql } from '../../server/modules/estimates/estimate-status.sql'
import { estimateStatusOf, sentEstimateStatusOf, type EstimateStatusFacts } from '../../shared/schemas/estimates'
import { makeTestApp } from './helpers/app'

const t = makeTestApp()
afterAll(() => t.close())

const bools = [false, true]
const depositStatuses: EstimateStatusFacts['depositStatus'][] = [null, 'awaiting_payment', 'paid', 'refunded']

const combinations: EstimateStatusFacts[] = bools.flatMap((withdrawn) =>
  bools.flatMap((sent) =>
    depositStatuses.flatMap((depositStatus) =>
      bools.flatMap((confirmed) =>
        bools.flatMap((expired) => bools.map((opened) => ({ withdrawn, sent, depositStatus, confirmed, expired, opened }))),
      ),
    ),
  ),
)

/** The SQL fragment over one-row stand-ins for e, w, v, ec and dp that hold exactly these facts. */
async function sqlStatus(f: EstimateStatusFacts, timezone: string): Promise<string | undefined> {
  const today = sql`(now() at time zone ${timezone})::date`
  const r = await t.db.execute<{ status: string }>(sql`
    select ${estimateStatusSql} as status
    from (select ${f.withdrawn ? sql`now()` : sql`null::timestamptz`} as withdrawn_at) e
    cross join (select ${timezone}::text as timezone) w
    left join (select gen_random_uuid() as id,
        ${f.confirmed ? sql`now()` : sql`null::timestamptz`} as confirmed_at,
        ${f.expired ? sql`${today} - 1` : today} as expires_on,
        ${f.opened ? sql`now()` : sql`null::timestamptz`} as opened_at) v on ${f.sent}
    left join (select 1) ec on true
    left join (select ${f.depositStatus}::text as status) dp on true`)
  return r.rows[0]?.status
}

describe('estimate status in SQL and in TypeScript', () => {
  it(`agree on all ${combinations.length} combinations of the facts, in two time zones`, async () => {
    for (const timezone of ['Europe/London', 'Pacific/Auckland']) {
      for (const f of combinations) {
        expect(await sqlStatus(f, timezone), JSON.stringify(f)).toBe(estimateStatusOf(f))
      }
    }
  })

  it('answers the same for a sent estimate whether asked as a sent one or as any', () => {
    for (const f of combinations.filter((c) => c.sent)) expect(sentEstimateStatusOf(f)).toBe(estimateStatusOf(f))
  })

  it('puts withdrawal first, then drafts, paid deposits, confirmation, expiry and opening', () => {
    const none: EstimateStatusFacts = { withdrawn: false, sent: true, depositStatus: null, confirmed: false, expired: false, opened: false }
    expect(estimateStatusOf({ ...none, withdrawn: true, sent: false })).toBe('withdrawn')
    expect(estimateStatusOf({ ...none, sent: false, confirmed: true })).toBe('draft')
    expect(estimateStatusOf({ ...none, depositStatus: 'refunded', confirmed: true, expired: true })).toBe('deposit_paid')
    expect(estimateStatusOf({ ...none, depositStatus: 'awaiting_payment', confirmed: true, expired: true })).toBe('confirmed')
    expect(estimateStatusOf({ ...none, expired: true, opened: true })).toBe('expired')
    expect(estimateStatusOf({ ...none, opened: true })).toBe('opened')
    expect(estimateStatusOf(none)).toBe('sent')
  })
})

describe('the decision day in the workshop’s time zone', () => {
  // UK clocks: GMT (UTC+0) in winter, British Summer Time (UTC+1) from the last Sunday of March to the
  // last Sunday of October (Summer Time Act 1972; gov.uk "When do the clocks change?").
  it('ends links at midnight at the end of the last day where the workshop is', async () => {
    const at = async (day: string, tz: string) =>
      (await t.db.execute<{ at: Date | string }>(sql`select ${linkExpiresAtSql(sql`${day}::date`, sql`${tz}::text`)} as at`)).rows[0]?.at
    expect(new Date((await at('2026-12-18', 'Europe/London')) as string).toISOString()).toBe('2026-12-19T00:00:00.000Z')
    expect(new Date((await at('2026-07-10', 'Europe/London')) as string).toISOString()).toBe('2026-07-10T23:00:00.000Z')
  })

  it('calls a version expired only once its last day has ended there', async () => {
    const expired = async (offsetDays: number) =>
      (
        await t.db.execute<{ x: boolean }>(
          sql`select ${versionExpiredSql(sql`(now() at time zone 'Europe/London')::date + ${offsetDays}::int`, sql`'Europe/London'::text`)} as x`,
        )
      ).rows[0]?.x
    expect(await expired(-1)).toBe(true)
    expect(await expired(0)).toBe(false)
    expect(await expired(1)).toBe(false)
  })
})
