import express from 'express'
import { IdParamsSchema } from '../../../shared/schemas/common'
import { type RouteTable, anyone, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import type { DepositsService } from './deposits.service'

/**
 * The provider's webhook. The signature covers the exact bytes sent, so this group is mounted
 * ahead of the JSON parser (and of sessions and the CSRF check, which a server-to-server call
 * cannot satisfy): the signature is its only credential.
 */
export function paymentsWebhookRoutes(table: RouteTable, service: DepositsService) {
  const g = table.group('/payments')
  g.post('/webhook', anyone, express.raw({ type: 'application/json', limit: '1mb' }), async (req, res) => {
    const event = service.verifyEvent(req.body, req.get('stripe-signature'))
    await service.handleEvent(event, req)
    res.json({ received: true })
  })
  return g
}

/** Staff actions on an estimate's deposit. */
export function paymentsRoutes(table: RouteTable, service: DepositsService) {
  const g = table.group('/estimates')
  g.post('/:id/deposit/refund', staffWith('estimates:write'), validate({ params: IdParamsSchema }), async (req, res) => {
    const { id } = req.params as { id: string }
    res.json(await service.refund(req, staffOf(req), id))
  })
  return g
}
