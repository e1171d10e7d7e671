import type { SystemRepo } from './system.repo'

export interface SystemService {
  health(): { status: 'ok'; uptimeSeconds: number; version: string }
  ready(): Promise<{ ok: true } | { ok: false; reason: string }>
}

export function createSystemService(repo: SystemRepo, version: string): SystemService {
  return {
    health: () => ({ status: 'ok', uptimeSeconds: Math.round(process.uptime()), version }),
    async ready() {
      try {
        await repo.ping()
        return { ok: true }
      } catch (err) {
        return { ok: false, reason: err instanceof Error ? err.message : String(err) }
      }
    },
  }
}
