import fs from 'node:fs'
import path from 'node:path'
import express from 'express'
import helmet from 'helmet'
import { pinoHttp } from 'pino-http'
import type pg from 'pg'
import type Stripe from 'stripe'
import type { Logger } from 'pino'
import { Passport } from 'passport'
import type { Database } from './db/client'
import type { Env } from './env'
import { auditContextOf, recordAudit } from './lib/audit'
import { type Mailer, createMailer } from './lib/mailer'
import type { EmailOutbox } from './modules/email/outbox'
import { createAuthLimits, createRenewLimits } from './lib/rate-limits'
import { RouteTable } from './lib/route-table'
import { absoluteLifetime, createSessionMiddleware, sessionCookieName } from './lib/session'
import { csrfProtection } from './middleware/csrf'
import { apiNotFound, errorHandler } from './middleware/errors'
import { requestId } from './middleware/request-id'
import { createAuditRepo } from './modules/audit/audit.repo'
import { auditRoutes } from './modules/audit/audit.routes'
import { createAuditService } from './modules/audit/audit.service'
import { catalogueRoutes } from './modules/catalogue/catalogue.routes'
import { createAuthRepo } from './modules/auth/auth.repo'
import { authRoutes, configureMagicLink, inviteSender } from './modules/auth/auth.routes'
import { createAuthService } from './modules/auth/auth.service'
import { portalRoutes } from './modules/portal/portal.routes'
import { noReferrer, portalEstimateRoutes } from './modules/portal/portal-estimates.routes'
import { createPortalRepo } from './modules/portal/portal.repo'
import { createPortalService } from './modules/portal/portal.service'
import { createPortalDecisionsService } from './modules/portal/portal-decisions.service'
import { createPortalLinksService } from './modules/portal/portal-links.service'
import { createPortalQuestionsService } from './modules/portal/portal-questions.service'
import { estimateQuestionRoutes } from './modules/portal/questions.routes'
import { createStaffRepo } from './modules/staff/staff.repo'
import { staffRoutes } from './modules/staff/staff.routes'
import { createStaffService } from './modules/staff/staff.service'
import { createSystemRepo } from './modules/system/system.repo'
import { createSystemService } from './modules/system/system.service'
import { systemRoutes } from './modules/system/system.routes'
import { createWorkshopRepo } from './modules/workshop/workshop.repo'
import { workshopRoutes } from './modules/workshop/workshop.routes'
import { createWorkshopService } from './modules/workshop/workshop.service'
import { recordRoutes } from './lib/record-routes'
import { createStripeClient } from './lib/stripe'
import { createDepositCheckoutService } from './modules/payments/deposit-checkout.service'
import { createDepositRefundService } from './modules/payments/deposit-refund.service'
import { createDepositWebhookService } from './modules/payments/deposit-webhook.service'
import { createDepositsRepo } from './modules/payments/deposits.repo'
import { paymentsRoutes, paymentsWebhookRoutes } from './modules/payments/payments.routes'
import { type FileStorage, createLocalStorage } from './lib/storage'
import { type LiveHub, createLiveHub } from './lib/live-hub'
import { liveRoutes } from './modules/live/live.routes'
import { createEstimatesRepo } from './modules/estimates/estimates.repo'
import { estimatesRoutes } from './modules/estimates/estimates.routes'
import { createEstimatesService } from './modules/estimates/estimates.service'
import { storedEstimateLinks } from './modules/portal/estimate-links.repo'
import { createEstimateItems } from './modules/estimates/estimate-items'
import { createEstimateDocumentService } from './modules/estimates/estimate-document.service'
import { createAccessStepsService } from './modules/catalogue/access-steps.service'
import { createClockTimesService } from './modules/catalogue/clock-times.service'
import { createLabourFilesService } from './modules/catalogue/labour-files.service'
import { createLabourOperationsService } from './modules/catalogue/labour-operations.service'
import { createLabourRepo } from './modules/catalogue/labour.repo'
import { createLabourService } from './modules/catalogue/labour.service'
import { createPartsRepo } from './modules/catalogue/parts.repo'
import { createPartsService } from './modules/catalogue/parts.service'
import { createPricingRepo } from './modules/catalogue/pricing.repo'
import { createPricingService } from './modules/catalogue/pricing.service'
import { createInspectionsRepo } from './modules/inspections/inspections.repo'
import { inspectionsRoutes } from './modules/inspections/inspections.routes'
import { createInspectionsService } from './modules/inspections/inspections.service'
import { createCustomersRepo } from './modules/customers/customers.repo'
import { createCustomersService } from './modules/customers/customers.service'
import { createJobsRepo } from './modules/jobs/jobs.repo'
import { createJobsService } from './modules/jobs/jobs.service'
import { createVehiclesRepo } from './modules/vehicles/vehicles.repo'
import { createVehiclesService } from './modules/vehicles/vehicles.service'
import {
  CustomerInputSchema,
  CustomerListQuerySchema,
  JobInputSchema,
  JobListQuerySchema,
  VehicleInputSchema,
  VehicleListQuerySchema,
} from '../shared/schemas/records'
import type { Principal } from '../shared/schemas/auth'

export interface AppDeps {
  env: Env
  db: Database
  pool: pg.Pool
  logger: Logger
  version?: string
  mailer?: Mailer
  storage?: FileStorage
  /** Built from STRIPE_SECRET_KEY and STRIPE_API_BASE when not given. */
  stripe?: Stripe
  /** Whoever passes one closes it; one made here connects on its first subscriber and is on app.locals.liveHub. */
  liveHub?: LiveHub
  /** Needs a started job queue, so the process (server/index.ts, tests) builds it and stops it. */
  outbox: EmailOutbox
}

/** Builds the Express app without listening, so tests drive it with supertest. */
export function createApp(deps: AppDeps): express.Express {
  const { env, logger } = deps
  const app = express()
  app.disable('x-powered-by')
  app.set('trust proxy', env.TRUST_PROXY ? 1 : false)
  app.set('query parser', 'simple')

  app.use(
    pinoHttp({
      logger,
      genReqId: requestId,
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      // Query strings can carry sign-in and estimate tokens, so they never reach the logs.
      serializers: {
        req: (req: { id: string; method: string; url: string }) => ({ id: req.id, method: req.method, path: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
    }),
  )
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

  const { db, pool } = deps
  const mailer = deps.mailer ?? createMailer(env)
  const table = new RouteTable()
  app.locals.routeTable = table
  app.set('session cookie name', sessionCookieName(env))
  const liveHub = deps.liveHub ?? createLiveHub({ connectionString: env.DATABASE_URL, logger })
  app.locals.liveHub = liveHub

  const authRepo = createAuthRepo(db)
  const authService = createAuthService({ repo: authRepo, db, mailer, logger, env })
  const passport = new Passport()
  configureMagicLink(passport, authService, env)
  passport.serializeUser((user: Express.User, done) => done(null, { kind: user.kind, id: user.id }))
  passport.deserializeUser((stored: { kind: 'staff' | 'customer'; id: string }, done) => {
    // Loaded fresh each request: a deactivated account or changed role takes effect at once.
    authRepo.loadPrincipal(stored.kind, stored.id).then((p: Principal | undefined) => done(null, p ?? false), done)
  })

  const stripe = deps.stripe ?? createStripeClient({ secretKey: env.STRIPE_SECRET_KEY, apiBase: env.STRIPE_API_BASE })
  const depositsRepo = createDepositsRepo(db)
  const storage = deps.storage ?? createLocalStorage(env.UPLOAD_DIR)
  const portalRepo = createPortalRepo(db)
  const portalQuestions = createPortalQuestionsService({ repo: portalRepo, outbox: deps.outbox, env })
  const api = express.Router()
  // Before the JSON parser, sessions and the CSRF check: the webhook is verified on its raw bytes.
  const paymentsWebhook = paymentsWebhookRoutes(
    table,
    createDepositWebhookService({ repo: depositsRepo, stripe, env, logger, outbox: deps.outbox }),
  )
  api.use(paymentsWebhook.base, paymentsWebhook.router)
  api.use(express.json({ limit: '1mb' }))
  api.use(createSessionMiddleware(env, pool))
  api.use(passport.session())
  api.use(
    absoluteLifetime(env, (req) =>
      recordAudit(db, auditContextOf(req), { action: 'session.expired', workshopId: req.user?.workshop.id ?? null }),
    ),
  )
  api.use(csrfProtection(env.ALLOWED_ORIGINS))

  const pricingRepo = createPricingRepo(db)
  const estimatesRepo = createEstimatesRepo(db)
  const documents = createEstimateDocumentService({ repo: estimatesRepo })
  const labourRepo = createLabourRepo(db)
  const labour = createLabourService({ repo: labourRepo, pricing: pricingRepo })
  const groups = [
    systemRoutes(table, createSystemService(createSystemRepo(pool), deps.version ?? '0.0.0')),
    authRoutes(table, { passport, service: authService, limits: createAuthLimits(env, pool) }),
    staffRoutes(table, {
      service: createStaffService({ repo: createStaffRepo(db), authRepo, db }),
      sendInvite: inviteSender(passport),
    }),
    workshopRoutes(table, createWorkshopService({ repo: createWorkshopRepo(db), db })),
    auditRoutes(table, createAuditService(createAuditRepo(db))),
    portalRoutes(table, createPortalService({ repo: portalRepo })),
    portalEstimateRoutes(table, {
      links: createPortalLinksService({
        repo: portalRepo,
        outbox: deps.outbox,
        env,
        logger,
        loadCustomer: (id) => authRepo.loadPrincipal('customer', id),
      }),
      decisions: createPortalDecisionsService({
        repo: portalRepo,
        outbox: deps.outbox,
        deposits: createDepositCheckoutService({ repo: depositsRepo, stripe, logger }),
        storage,
        env,
      }),
      questions: portalQuestions,
      documents,
      limits: createRenewLimits(env, pool),
    }),
    estimateQuestionRoutes(table, portalQuestions),
    catalogueRoutes(table, {
      pricing: createPricingService({ repo: pricingRepo, db }),
      labour,
      operations: createLabourOperationsService({ repo: labourRepo, labour }),
      steps: createAccessStepsService({ repo: labourRepo, labour }),
      labourFiles: createLabourFilesService({ repo: labourRepo }),
      clockTimes: createClockTimesService({ repo: labourRepo }),
      parts: createPartsService({ repo: createPartsRepo(db), pricing: pricingRepo }),
    }),
    recordRoutes(table, '/customers', {
      read: 'customers:read',
      write: 'customers:write',
      input: CustomerInputSchema,
      listQuery: CustomerListQuerySchema,
      service: createCustomersService(createCustomersRepo(db)),
    }),
    recordRoutes(table, '/vehicles', {
      read: 'vehicles:read',
      write: 'vehicles:write',
      input: VehicleInputSchema,
      listQuery: VehicleListQuerySchema,
      service: createVehiclesService(createVehiclesRepo(db)),
    }),
    ...inspectionsRoutes(table, createInspectionsService({ repo: createInspectionsRepo(db), storage })),
    recordRoutes(table, '/jobs', {
      read: 'jobs:read',
      write: 'jobs:write',
      input: JobInputSchema,
      listQuery: JobListQuerySchema,
      service: createJobsService(createJobsRepo(db)),
    }),
    liveRoutes(table, liveHub),
    paymentsRoutes(table, createDepositRefundService({ repo: depositsRepo, stripe, logger, outbox: deps.outbox })),
    ...estimatesRoutes(table, {
      documents,
      service: createEstimatesService({
        repo: estimatesRepo,
        items: createEstimateItems({
          repo: estimatesRepo,
          labour,
          pricing: pricingRepo,
        }),
        links: storedEstimateLinks,
        outbox: deps.outbox,
        env,
        logger,
      }),
    }),
  ]
  for (const g of groups) api.use(g.base || '/', g.router)
  api.use(apiNotFound)
  app.use('/api', api)

  const dist = env.CLIENT_DIST ? path.resolve(env.CLIENT_DIST) : ''
  if (dist && fs.existsSync(path.join(dist, 'index.html'))) {
    app.use(express.static(dist, { index: false, maxAge: '1h', setHeaders: immutableAssets }))
    // The estimate link's page holds its token in the address until the page has read it.
    app.get('/portal/open', noReferrer)
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
