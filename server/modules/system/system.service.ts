import type pg from 'pg'

export interface SystemService {
  health(): { status: 'ok'; uptimeSeconds: number; version: string }
  ready(): Promise<{ ok: true } | { ok: false; reason: string }>
}

export function createSystemService(pool: pg.Pool, version: string): SystemService {
  return {
    health: () => ({ status: 'ok', uptimeSeconds: Math.round(process.uptime()), version }),
    async ready() {
      try {
        await pool.query('select 1')
        return { ok: true }
      } catch (err) {
        return { ok: false, reason: err instanceof Error ? err.message : String(err) }
      }
    },
  }
}
