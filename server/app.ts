import fs from 'node:fs'
import path from 'node:path'
import express from 'express'
import helmet from 'helmet'
import { pinoHttp } from 'pino-http'
import type pg from 'pg'
import type { Logger } from 'pino'
import type { Database } from './db/client'
import type { Env } from './env'
import { apiNotFound, errorHandler } from './middleware/errors'
import { requestId } from './middleware/request-id'
import { createSystemService } from './modules/system/system.service'
import { systemRoutes } from './modules/system/system.routes'

export interface AppDeps {
  env: Env
  db: Database
  pool: pg.Pool
  logger: Logger
  version?: string
}

/** Builds the Express app without listening, so tests drive it with supertest. */
export function createApp(deps: AppDeps): express.Express {
  const { env, logger } = deps
  const app = express()
  app.disable('x-powered-by')
  app.set('trust proxy', env.TRUST_PROXY ? 1 : false)
  app.set('query parser', 'simple')

  app.use(pinoHttp({ logger, genReqId: requestId, autoLogging: { ignore: (req) => req.url === '/api/health' } }))
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          // Vuetify writes its theme colours into a <style> element at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
        },
      },
      strictTransportSecurity: env.PUBLIC_BASE_URL.startsWith('https:'),
    }),
  )

  const api = express.Router()
  api.use(express.json({ limit: '1mb' }))
  api.use(systemRoutes(createSystemService(deps.pool, deps.version ?? '0.0.0')))
  api.use(apiNotFound)
  app.use('/api', api)

  const dist = env.CLIENT_DIST ? path.resolve(env.CLIENT_DIST) : ''
  if (dist && fs.existsSync(path.join(dist, 'index.html'))) {
    app.use(express.static(dist, { index: false, maxAge: '1h', setHeaders: immutableAssets }))
    // Client-side routes all answer with the app shell.
    app.get(/^(?!\/api\/).*/, (_req, res) => {
      res.set('Cache-Control', 'no-cache').sendFile(path.join(dist, 'index.html'))
    })
  }

  app.use(errorHandler)
  return app
}

function immutableAssets(res: express.Response, filePath: string) {
  if (filePath.includes(`${path.sep}assets${path.sep}`)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable')
}
