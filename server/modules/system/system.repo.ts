import type pg from 'pg'

/** The pool itself, not Drizzle: readiness asks whether a connection can be had and used at all. */
export function createSystemRepo(pool: pg.Pool) {
  return {
    async ping(): Promise<void> {
      await pool.query('select 1')
    },
  }
}

export type SystemRepo = ReturnType<typeof createSystemRepo>
