import express, { type Request, type Response } from 'express'
import { readCardForm } from './cards'
import { answerAuthentication, expireDueSessions, type FakeDeps, type PaymentOutcome, submitPayment } from './checkout'
import { type FormState, type PageView, renderChallengePage, renderClosedPage, renderNotFoundPage, renderPaymentPage } from './page'
import type { Account, SessionRecord } from './state'

function formText(body: unknown, name: string): string {
  if (typeof body !== 'object' || body === null) return ''
  const value: unknown = Reflect.get(body, name)
  return typeof value === 'string' ? value : ''
}

/**
 * The hosted page behind a Checkout Session's `url`: the customer's side of Stripe Checkout
 * (https://docs.stripe.com/payments/checkout), driven by plain form posts so that tests can
 * pay exactly as a browser without JavaScript would.
 *
 * Status codes say what happened, for tests and curl: 200 page, 303 redirect to success_url,
 * 402 card declined (page shown again), 422 form incomplete, 404 unknown session, 410 expired.
 */
export function createPaymentPageRouter(deps: FakeDeps): express.Router {
  const router = express.Router()
  router.use(express.urlencoded({ extended: false, limit: '16kb' }))
  router.use((_req, res, next) => {
    res.set('Content-Security-Policy', "default-src 'none'; style-src 'unsafe-inline'; base-uri 'none'; frame-ancestors 'none'")
    res.set('Cache-Control', 'no-store')
    res.set('X-Robots-Tag', 'noindex')
    next()
  })

  const find = (req: Request, res: Response): { account: Account; record: SessionRecord; view: PageView } | undefined => {
    const found = deps.store.findSession(String(req.params.id ?? ''))
    if (!found) {
      res.status(404).type('html').send(renderNotFoundPage())
      return undefined
    }
    expireDueSessions(deps, found.account)
    const { session } = found.record
    const locale = session.locale && session.locale !== 'auto' ? session.locale : 'en-GB'
    const view = {
      merchant: deps.merchantName(found.record),
      record: found.record,
      locale: Intl.NumberFormat.supportedLocalesOf(locale)[0] ?? 'en-GB',
    }
    return { ...found, view }
  }

  const closed = (res: Response, view: PageView) => {
    res
      .status(view.record.session.status === 'expired' ? 410 : 200)
      .type('html')
      .send(renderClosedPage(view))
  }

  const answer = (res: Response, view: PageView, outcome: PaymentOutcome, state: FormState) => {
    switch (outcome.kind) {
      case 'succeeded': {
        const { session } = view.record
        res.redirect(303, (session.success_url ?? '').replaceAll('{CHECKOUT_SESSION_ID}', session.id))
        return
      }
      case 'declined':
        res
          .status(402)
          .type('html')
          .send(renderPaymentPage(view, { ...state, alert: outcome.message }))
        return
      case 'authentication_required':
        res.status(200).type('html').send(renderChallengePage(view, outcome.challengeId))
        return
      case 'not_open':
        closed(res, view)
    }
  }

  router.get('/c/pay/:id', (req, res) => {
    const found = find(req, res)
    if (!found) return
    if (found.record.session.status !== 'open') return closed(res, found.view)
    res.status(200).type('html').send(renderPaymentPage(found.view))
  })

  router.post('/c/pay/:id', (req, res) => {
    const found = find(req, res)
    if (!found) return
    const { account, record, view } = found
    if (record.session.status !== 'open') return closed(res, view)
    const text = (name: string) => formText(req.body, name)
    const email = record.session.customer_email ?? text('email').trim()
    const state: FormState = { email, fieldErrors: {} }
    if (record.session.customer_email === null) {
      if (email === '') state.fieldErrors = { email: 'Your email is incomplete.' }
      else if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email)) state.fieldErrors = { email: 'Your email address is invalid.' }
    }
    const card = readCardForm(
      { number: text('card_number'), expiry: text('card_expiry'), cvc: text('card_cvc') },
      new Date(account.now() * 1000),
    )
    for (const e of card.errors) state.fieldErrors = { ...state.fieldErrors, [e.field]: e.message }
    if (!card.card || Object.keys(state.fieldErrors ?? {}).length > 0) {
      res.status(422).type('html').send(renderPaymentPage(view, state))
      return
    }
    answer(res, view, submitPayment(deps, account, record, card.card, email), { email })
  })

  router.post('/c/pay/:id/authenticate', (req, res) => {
    const found = find(req, res)
    if (!found) return
    const { account, record, view } = found
    const outcome = answerAuthentication(
      deps,
      account,
      record,
      formText(req.body, 'challenge'),
      formText(req.body, 'result') === 'complete',
    )
    if (outcome.kind === 'no_challenge') {
      res
        .status(409)
        .type('html')
        .send(renderPaymentPage(view, { alert: 'That confirmation step is no longer waiting for an answer.' }))
      return
    }
    answer(res, view, outcome, { email: record.session.customer_email ?? '' })
  })

  return router
}
