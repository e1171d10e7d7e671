import express from 'express'
import { auditContextOf } from '../../lib/audit'
import { answerById } from '../../lib/record-routes'
import { anyone, staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import type { DepositRefundService } from './deposit-refund.service'
import type { DepositWebhookService } from './deposit-webhook.service'

/**
 * The provider's webhook. The signature covers the exact bytes sent, so this group is mounted
 * ahead of the JSON parser (and of sessions and the CSRF check, which a server-to-server call
 * cannot satisfy): the signature is its only credential.
 */
export function paymentsWebhookRoutes(table: RouteTable, service: DepositWebhookService) {
  const g = table.group('/payments')
  g.post('/webhook', anyone, express.raw({ type: 'application/json', limit: '1mb' }), async (req, res) => {
    const body: unknown = req.body
    // The caller's address stays on the audit record as for any other request; the entry names the card payment as the actor.
    await service.handleWebhook(Buffer.isBuffer(body) ? body : undefined, req.get('stripe-signature'), auditContextOf(req))
    res.json({ received: true })
  })
  return g
}

/** Staff actions on an estimate's deposit. */
export function paymentsRoutes(table: RouteTable, service: DepositRefundService) {
  const g = table.group('/estimates')
  g.post(
    '/:id/deposit/refund',
    staffWith('estimates:write'),
    answerById(({ id, me, ctx }) => service.refund(ctx, me, id)),
  )
  return g
}
