import { and, desc, eq, gt, isNull, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { customers, signInTokens, staffUsers, workshops } from '../../db/schema'
import type { Principal } from '../../../shared/schemas/auth'

const workshopColumns = { id: workshops.id, name: workshops.name, currency: workshops.currency, timezone: workshops.timezone }

export function createAuthRepo(db: Database) {
  return {
    async activeStaffByEmail(email: string) {
      const [row] = await db
        .select({
          id: staffUsers.id,
          name: staffUsers.name,
          email: staffUsers.email,
          workshopId: staffUsers.workshopId,
          workshopName: workshops.name,
        })
        .from(staffUsers)
        .innerJoin(workshops, eq(workshops.id, staffUsers.workshopId))
        .where(and(sql`lower(${staffUsers.email}) = ${email.toLowerCase()}`, isNull(staffUsers.deactivatedAt)))
      return row
    },

    async customersByEmail(email: string) {
      return db
        .select({
          id: customers.id,
          name: customers.name,
          email: customers.email,
          workshopId: customers.workshopId,
          workshopName: workshops.name,
        })
        .from(customers)
        .innerJoin(workshops, eq(workshops.id, customers.workshopId))
        .where(and(sql`lower(${customers.email}) = ${email.toLowerCase()}`, isNull(customers.archivedAt)))
        .orderBy(desc(customers.createdAt))
        .limit(1)
    },

    async insertToken(row: typeof signInTokens.$inferInsert) {
      await db.insert(signInTokens).values(row)
    },

    /** Marks the token used if it is unused and unexpired, in one statement, so two processes cannot both accept it. */
    async consumeToken(tokenHash: string) {
      const [row] = await db
        .update(signInTokens)
        .set({ usedAt: new Date() })
        .where(and(eq(signInTokens.tokenHash, tokenHash), isNull(signInTokens.usedAt), gt(signInTokens.expiresAt, new Date())))
        .returning()
      return row
    },

    async findToken(tokenHash: string) {
      const [row] = await db.select().from(signInTokens).where(eq(signInTokens.tokenHash, tokenHash))
      return row
    },

    async loadPrincipal(kind: 'staff' | 'customer', id: string): Promise<Principal | undefined> {
      if (kind === 'staff') {
        const [row] = await db
          .select({
            id: staffUsers.id,
            name: staffUsers.name,
            email: staffUsers.email,
            role: staffUsers.role,
            deactivatedAt: staffUsers.deactivatedAt,
            workshop: workshopColumns,
          })
          .from(staffUsers)
          .innerJoin(workshops, eq(workshops.id, staffUsers.workshopId))
          .where(eq(staffUsers.id, id))
        if (!row || row.deactivatedAt) return undefined
        return { kind: 'staff', id: row.id, name: row.name, email: row.email, role: row.role, workshop: row.workshop }
      }
      const [row] = await db
        .select({
          id: customers.id,
          name: customers.name,
          email: customers.email,
          archivedAt: customers.archivedAt,
          workshop: workshopColumns,
        })
        .from(customers)
        .innerJoin(workshops, eq(workshops.id, customers.workshopId))
        .where(eq(customers.id, id))
      if (!row || row.archivedAt || !row.email) return undefined
      return { kind: 'customer', id: row.id, name: row.name, email: row.email, workshop: row.workshop }
    },

    async markSignedIn(staffUserId: string) {
      await db.update(staffUsers).set({ lastSignInAt: new Date() }).where(eq(staffUsers.id, staffUserId))
    },

    /** Ends every server-side session of a principal (sign-out everywhere, deactivation). */
    async endSessionsOf(kind: 'staff' | 'customer', id: string) {
      await db.execute(
        sql`delete from sessions where sess->'passport'->'user'->>'id' = ${id} and sess->'passport'->'user'->>'kind' = ${kind}`,
      )
    },
  }
}

export type AuthRepo = ReturnType<typeof createAuthRepo>
