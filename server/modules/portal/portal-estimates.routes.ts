import type { ErrorRequestHandler, Request, RequestHandler } from 'express'
import type { Database } from '../../db/client'
import { type RouteTable, anyone, customerOnly } from '../../lib/route-table'
import { customerOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import { renderVersionPdf } from '../estimates/estimate-document'
import { type PortalService, PortalRefusal } from './portal.service'
import type { Principal } from '../../../shared/schemas/auth'
import {
  AskQuestionSchema,
  ConfirmEstimateSchema,
  OpenLinkSchema,
  PortalEstimateParamsSchema,
  PortalEstimateQuerySchema,
  PortalItemParamsSchema,
  PortalPhotoParamsSchema,
  PutDecisionSchema,
  RenewLinkSchema,
  type AskQuestion,
  type ConfirmEstimate,
  type OpenLinkResponse,
  type PortalEstimateQuery,
  type PutDecision,
} from '../../../shared/schemas/portal'

/**
 * The estimate token is a capability, so a page that holds it in its address (the app shell at
 * /portal/open) must not hand that address to anyone it links to or loads from. Helmet already
 * sends no-referrer everywhere; saying it here keeps these answers right should that default change.
 */
export const noReferrer: RequestHandler = (_req, res, next) => {
  res.set('Referrer-Policy', 'no-referrer')
  next()
}

/** API answers to a token: no referrer, and nothing on the way keeps a copy. */
const tokenAnswer: RequestHandler = (_req, res, next) => {
  res.set('Referrer-Policy', 'no-referrer')
  res.set('Cache-Control', 'no-store')
  next()
}

/** The portal's refusals carry `details` (what a page needs to offer the next step) beside the usual code and message. */
const portalRefusals: ErrorRequestHandler = (err: unknown, _req, res, next) => {
  if (!(err instanceof PortalRefusal) || res.headersSent) return next(err)
  res
    .status(err.status)
    .json({ error: { code: err.code, message: err.message, ...(err.issues ? { issues: err.issues } : {}), details: err.details } })
}

const idOf = (req: Request) => (req.params as { id: string }).id

export function portalEstimateRoutes(
  table: RouteTable,
  deps: { service: PortalService; db: Database; limits: { byIp: RequestHandler; byToken: RequestHandler } },
) {
  const { service, db, limits } = deps
  const g = table.group('/portal')
  const params = validate({ params: PortalEstimateParamsSchema })

  g.post('/open', anyone, tokenAnswer, validate({ body: OpenLinkSchema }), async (req, res) => {
    const opened = await service.open(req, (req.body as { token: string }).token)
    // passport regenerates the session on log-in: whoever was signed in before in this browser is signed out.
    await new Promise<void>((resolve, reject) => req.logIn(opened.principal, (err) => (err ? reject(err as Error) : resolve())))
    req.session.signedInAt = Date.now()
    res.json({
      estimateId: opened.estimateId,
      version: opened.version,
      user: opened.principal as Extract<Principal, { kind: 'customer' }>,
    } satisfies OpenLinkResponse)
  })

  g.post(
    '/estimate-links/renew',
    anyone,
    tokenAnswer,
    limits.byIp,
    validate({ body: RenewLinkSchema }),
    limits.byToken,
    async (req, res) => {
      await service.renew(req, (req.body as { token: string }).token)
      res.status(202).json({ message: service.renewAnswer })
    },
  )

  g.get('/estimates', customerOnly, async (req, res) => {
    res.json({ items: await service.list(customerOf(req)) })
  })

  g.get(
    '/estimates/:id',
    customerOnly,
    validate({ params: PortalEstimateParamsSchema, query: PortalEstimateQuerySchema }),
    async (req, res) => {
      res.json(await service.get(customerOf(req), idOf(req), (req.query as PortalEstimateQuery).version))
    },
  )

  g.put(
    '/estimates/:id/decisions/:itemId',
    customerOnly,
    validate({ params: PortalItemParamsSchema, body: PutDecisionSchema }),
    async (req, res) => {
      res.json(await service.decide(req, customerOf(req), idOf(req), (req.params as { itemId: string }).itemId, req.body as PutDecision))
    },
  )

  g.post(
    '/estimates/:id/questions',
    customerOnly,
    validate({ params: PortalEstimateParamsSchema, body: AskQuestionSchema }),
    async (req, res) => {
      res.status(201).json(await service.ask(req, customerOf(req), idOf(req), req.body as AskQuestion))
    },
  )

  g.post(
    '/estimates/:id/confirm',
    customerOnly,
    validate({ params: PortalEstimateParamsSchema, body: ConfirmEstimateSchema }),
    async (req, res) => {
      const { created, answer } = await service.confirm(req, customerOf(req), idOf(req), req.body as ConfirmEstimate)
      res.status(created ? 201 : 200).json(answer)
    },
  )

  g.get('/estimates/:id/deposit', customerOnly, params, async (req, res) => {
    res.set('Cache-Control', 'no-store').json(await service.deposit(customerOf(req), idOf(req)))
  })

  g.post('/estimates/:id/deposit/checkout', customerOnly, params, async (req, res) => {
    res.json(await service.checkout(req, customerOf(req), idOf(req)))
  })

  const sendPhoto =
    (variant: 'full' | 'thumb'): RequestHandler =>
    async (req, res) => {
      const { photoId } = req.params as { photoId: string }
      const { data, contentType } = await service.photo(customerOf(req), idOf(req), photoId, variant)
      res
        .set('Content-Type', contentType)
        .set(
          'Content-Disposition',
          `inline; filename="photo-${photoId.slice(0, 8)}${variant === 'thumb' ? '-small' : ''}.${contentType === 'image/png' ? 'png' : 'jpg'}"`,
        )
        .set('Cache-Control', 'private, max-age=86400')
        .set('X-Content-Type-Options', 'nosniff')
        .send(data)
    }
  g.get('/estimates/:id/photos/:photoId', customerOnly, validate({ params: PortalPhotoParamsSchema }), sendPhoto('full'))
  g.get('/estimates/:id/photos/:photoId/thumb', customerOnly, validate({ params: PortalPhotoParamsSchema }), sendPhoto('thumb'))

  g.get(
    '/estimates/:id/pdf',
    customerOnly,
    validate({ params: PortalEstimateParamsSchema, query: PortalEstimateQuerySchema }),
    async (req, res) => {
      const { workshopId, versionId } = await service.pdfVersion(customerOf(req), idOf(req), (req.query as PortalEstimateQuery).version)
      const { bytes, filename } = await renderVersionPdf(db, workshopId, versionId)
      res
        .set('Content-Type', 'application/pdf')
        .set('Content-Disposition', `attachment; filename="${filename}"`)
        .set('Cache-Control', 'private, no-store')
        .set('X-Content-Type-Options', 'nosniff')
        .send(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength))
    },
  )

  g.router.use(portalRefusals)
  return g
}
