import { type SQLWrapper, sql } from 'drizzle-orm'
import type { EstimateStatus } from '../../../shared/schemas/estimates'

/**
 * SQL twins of rules written once in TypeScript, for queries that must filter, sort or lock on them.
 * A test (tests/server/estimate-status.test.ts) checks each against its twin.
 */

/** A version's decision day is a calendar day of the workshop: expired once that day has ended where the workshop is. */
export const versionExpiredSql = (expiresOn: SQLWrapper, timezone: SQLWrapper) =>
  sql<boolean>`(${expiresOn} < (now() at time zone ${timezone})::date)`

/** The instant a version's links stop working: the end of its decision day in the workshop's time zone. */
export const linkExpiresAtSql = (expiresOn: SQLWrapper, timezone: SQLWrapper) =>
  sql<Date>`((${expiresOn})::date + 1)::timestamp at time zone ${timezone}`

/**
 * estimateStatusOf (shared/schemas/estimates.ts) in SQL, over an estimate `e`, its workshop `w`, its latest
 * version `v`, that version's confirmation `ec` and deposit `dp` (estimateStatusJoins supplies the last three).
 */
export const estimateStatusSql = sql<EstimateStatus>`case
  when e.withdrawn_at is not null then 'withdrawn'
  when v.id is null then 'draft'
  when dp.status in ('paid', 'refunded') then 'deposit_paid'
  when v.confirmed_at is not null then 'confirmed'
  when ${versionExpiredSql(sql`v.expires_on`, sql`w.timezone`)} then 'expired'
  when v.opened_at is not null then 'opened'
  else 'sent' end`

/** The latest version (v), its confirmation (ec) and deposit (dp) beside each estimate e, for estimateStatusSql. */
export const estimateStatusJoins = sql`left join lateral (select * from estimate_versions x where x.workshop_id = e.workshop_id and x.estimate_id = e.id order by x.version desc limit 1) v on true
  left join estimate_confirmations ec on ec.version_id = v.id
  left join deposit_payments dp on dp.confirmation_id = ec.id`
