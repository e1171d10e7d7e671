import type { RequestHandler } from 'express'
import { auditContextOf } from '../../lib/audit'
import { anyone, customerOnly } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { customerOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { PortalDecisionsService } from './portal-decisions.service'
import type { PortalLinksService } from './portal-links.service'
import type { PortalQuestionsService } from './portal-questions.service'
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
  type OpenLinkResponse,
} from '../../../shared/schemas/portal'

/** The PDF of a sent version; the estimates module's document service is one. */
export interface VersionDocuments {
  renderVersion(workshopId: string, versionId: string): Promise<{ bytes: Uint8Array; filename: string }>
}

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

const byId = { params: PortalEstimateParamsSchema }
const byVersion = { params: PortalEstimateParamsSchema, query: PortalEstimateQuerySchema }

export function portalEstimateRoutes(
  table: RouteTable,
  deps: {
    links: PortalLinksService
    decisions: PortalDecisionsService
    questions: PortalQuestionsService
    documents: VersionDocuments
    limits: { byIp: RequestHandler; byToken: RequestHandler }
  },
) {
  const { links, decisions, questions, documents, limits } = deps
  const g = table.group('/portal')

  g.post(
    '/open',
    anyone,
    tokenAnswer,
    handle({ body: OpenLinkSchema }, async (req, res) => {
      const opened = await links.open(auditContextOf(req), req.body.token)
      // passport regenerates the session on log-in: whoever was signed in before in this browser is signed out.
      await new Promise<void>((resolve, reject) => req.logIn(opened.principal, (err) => (err ? reject(err as Error) : resolve())))
      req.session.signedInAt = Date.now()
      res.json({ estimateId: opened.estimateId, version: opened.version, user: opened.principal } satisfies OpenLinkResponse)
    }),
  )

  g.post(
    '/estimate-links/renew',
    anyone,
    tokenAnswer,
    limits.byIp,
    handle({ body: RenewLinkSchema }, limits.byToken, async (req, res) => {
      await links.renew(auditContextOf(req), req.body.token)
      res.status(202).json({ message: links.renewAnswer })
    }),
  )

  g.get(
    '/estimates/:id',
    customerOnly,
    handle(byVersion, async (req, res) => {
      res.json(await decisions.get(customerOf(req), req.params.id, req.query.version))
    }),
  )

  g.put(
    '/estimates/:id/decisions/:itemId',
    customerOnly,
    handle({ params: PortalItemParamsSchema, body: PutDecisionSchema }, async (req, res) => {
      res.json(await decisions.decide(auditContextOf(req), customerOf(req), req.params.id, req.params.itemId, req.body))
    }),
  )

  g.post(
    '/estimates/:id/questions',
    customerOnly,
    handle({ ...byId, body: AskQuestionSchema }, async (req, res) => {
      res.status(201).json(await questions.ask(auditContextOf(req), customerOf(req), req.params.id, req.body))
    }),
  )

  g.post(
    '/estimates/:id/confirm',
    customerOnly,
    handle({ ...byId, body: ConfirmEstimateSchema }, async (req, res) => {
      const { created, answer } = await decisions.confirm(auditContextOf(req), customerOf(req), req.params.id, req.body)
      res.status(created ? 201 : 200).json(answer)
    }),
  )

  g.get(
    '/estimates/:id/deposit',
    customerOnly,
    handle(byId, async (req, res) => {
      res.set('Cache-Control', 'no-store').json(await decisions.deposit(customerOf(req), req.params.id))
    }),
  )

  g.post(
    '/estimates/:id/deposit/checkout',
    customerOnly,
    handle(byId, async (req, res) => {
      res.json(await decisions.checkout(auditContextOf(req), customerOf(req), req.params.id))
    }),
  )

  const sendPhoto = (variant: 'full' | 'thumb') =>
    handle({ params: PortalPhotoParamsSchema }, async (req, res) => {
      const { id, photoId } = req.params
      const { data, contentType } = await decisions.photo(customerOf(req), id, photoId, variant)
      res
        .set('Content-Type', contentType)
        .set(
          'Content-Disposition',
          `inline; filename="photo-${photoId.slice(0, 8)}${variant === 'thumb' ? '-small' : ''}.${contentType === 'image/png' ? 'png' : 'jpg'}"`,
        )
        .set('Cache-Control', 'private, max-age=86400')
        .set('X-Content-Type-Options', 'nosniff')
        .send(data)
    })
  g.get('/estimates/:id/photos/:photoId', customerOnly, sendPhoto('full'))
  g.get('/estimates/:id/photos/:photoId/thumb', customerOnly, sendPhoto('thumb'))

  g.get(
    '/estimates/:id/pdf',
    customerOnly,
    handle(byVersion, async (req, res) => {
      const { workshopId, versionId } = await decisions.pdfVersion(customerOf(req), req.params.id, req.query.version)
      const { bytes, filename } = await documents.renderVersion(workshopId, versionId)
      res
        .set('Content-Type', 'application/pdf')
        .set('Content-Disposition', `attachment; filename="${filename}"`)
        .set('Cache-Control', 'private, no-store')
        .set('X-Content-Type-Options', 'nosniff')
        .send(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength))
    }),
  )

  return g
}
