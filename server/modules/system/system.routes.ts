import { Router } from 'express'
import type { SystemService } from './system.service'

export function systemRoutes(service: SystemService): Router {
  const router = Router()
  router.get('/health', (_req, res) => {
    res.json(service.health())
  })
  router.get('/ready', async (req, res) => {
    const ready = await service.ready()
    if (ready.ok) {
      res.json({ status: 'ready', database: 'ok' })
      return
    }
    req.log.warn({ reason: ready.reason }, 'not ready')
    res.status(503).json({ error: { code: 'not_ready', message: 'The database cannot be reached right now.' } })
  })
  return router
}
