import type { CardField } from './cards'
import { TEST_CARDS } from './cards'
import { formatAmount } from './money'
import type { SessionRecord } from './state'

/**
 * The fake's own payment page: plain HTML and inline CSS (no scripts, fonts or other
 * assets from anywhere), a plain form that works without JavaScript, labels on every
 * field, targets at least 44px high and text contrast well above WCAG AA.
 */

const escapeHtml = (s: string) =>
  s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;')

const STYLE = `
*{box-sizing:border-box}
body{margin:0;font-family:system-ui,-apple-system,"Segoe UI",Roboto,Arial,sans-serif;font-size:1rem;line-height:1.5;color:#1a1a1a;background:#f4f5f6}
.test-banner{background:#fff1c2;color:#3d2f00;border-bottom:3px solid #c8642b;padding:.75rem 1rem;text-align:center}
main{max-width:30rem;margin:0 auto;padding:1.25rem 1rem 2.5rem}
.card{background:#fff;border:1px solid #d5d9de;border-radius:8px;padding:1.25rem}
h1{font-size:1.25rem;margin:0 0 .25rem}
h2{font-size:1.05rem;margin:1.25rem 0 .5rem}
.due{font-size:1.75rem;font-weight:700;margin:.25rem 0 1rem}
.items{list-style:none;margin:0 0 1rem;padding:0;border-top:1px solid #d5d9de}
.items li{display:flex;justify-content:space-between;gap:1rem;padding:.5rem 0;border-bottom:1px solid #d5d9de}
.items .desc{display:block;color:#4a4f55;font-size:.9rem}
label{display:block;font-weight:600;margin:.75rem 0 .25rem}
input{display:block;width:100%;min-height:48px;padding:.5rem .75rem;font-size:1rem;border:2px solid #6b7178;border-radius:6px;background:#fff;color:#1a1a1a}
input:focus,button:focus,a:focus{outline:3px solid #c8642b;outline-offset:2px}
input[aria-invalid=true]{border-color:#b3261e}
.row{display:flex;gap:.75rem}.row>div{flex:1}
.field-error{color:#b3261e;font-size:.95rem;margin:.25rem 0 0}
.alert{border:2px solid #b3261e;background:#fdecea;color:#5c0f0a;border-radius:6px;padding:.75rem;margin:0 0 1rem}
.notice{border:2px solid #1f3a4d;background:#eef3f6;color:#1f3a4d;border-radius:6px;padding:.75rem;margin:0 0 1rem}
button,.button{display:block;width:100%;min-height:48px;margin-top:1.25rem;padding:.75rem 1rem;font-size:1.05rem;font-weight:700;border:0;border-radius:6px;background:#1f3a4d;color:#fff;cursor:pointer;text-align:center;text-decoration:none}
button.secondary{background:#fff;color:#1f3a4d;border:2px solid #1f3a4d}
a{color:#1f3a4d}
.back{display:inline-flex;align-items:center;min-height:44px;margin-bottom:.5rem}
details{margin-top:1.5rem}summary{min-height:44px;padding:.6rem 0;cursor:pointer;font-weight:600}
table{border-collapse:collapse;width:100%;font-size:.9rem}td,th{text-align:left;padding:.35rem .25rem;border-bottom:1px solid #d5d9de}
code{font-family:ui-monospace,Menlo,Consolas,monospace}
.visually-hidden{position:absolute;width:1px;height:1px;overflow:hidden;clip:rect(0 0 0 0);white-space:nowrap}
`

export interface PageView {
  merchant: string
  record: SessionRecord
  locale: string
}

function layout(title: string, body: string): string {
  return `<!doctype html>
<html lang="en-GB">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex">
<title>${escapeHtml(title)} — TEST payment page</title>
<style>${STYLE}</style>
</head>
<body>
<div class="test-banner" role="note"><strong>TEST PAYMENT PAGE</strong> — a local stand-in for Stripe Checkout. No real card is charged and no money moves.</div>
<main>
${body}
</main>
</body>
</html>`
}

function summary(view: PageView): string {
  const { lineItems, total } = view.record
  const money = (amount: number) => escapeHtml(formatAmount(amount, total.currency, view.locale))
  const items = lineItems
    .map(
      (item) =>
        `<li><span>${escapeHtml(item.name)}${item.quantity > 1 ? ` × ${item.quantity}` : ''}${
          item.description ? `<span class="desc">${escapeHtml(item.description)}</span>` : ''
        }</span><span>${money(item.unitAmount * item.quantity)}</span></li>`,
    )
    .join('')
  return `<h1>${escapeHtml(view.merchant)}</h1>
<p class="due"><span class="visually-hidden">Amount due: </span>${money(total.amount)}</p>
<ul class="items" aria-label="What you are paying for">${items}</ul>`
}

function backLink(view: PageView): string {
  const cancel = view.record.session.cancel_url
  return cancel ? `<a class="back" href="${escapeHtml(cancel)}">← Back to ${escapeHtml(view.merchant)}</a>` : ''
}

export interface FormState {
  email?: string
  fieldErrors?: Partial<Record<CardField | 'email', string>>
  alert?: string
}

function field(id: CardField | 'email', label: string, attrs: string, state: FormState, value = ''): string {
  const error = state.fieldErrors?.[id]
  return `<div><label for="${id}">${escapeHtml(label)}</label>
<input id="${id}" name="${id}" ${attrs} value="${escapeHtml(value)}"${error ? ` aria-invalid="true" aria-describedby="${id}-error"` : ''}>
${error ? `<p class="field-error" id="${id}-error">Error: ${escapeHtml(error)}</p>` : ''}</div>`
}

export function renderPaymentPage(view: PageView, state: FormState = {}): string {
  const { session } = view.record
  const total = formatAmount(view.record.total.amount, view.record.total.currency, view.locale)
  const alert = state.alert
    ? `<div class="alert" role="alert"><strong>Payment not taken.</strong> ${escapeHtml(state.alert)}${
        /try again/i.test(state.alert) ? '' : ' Check the details or use another card, then try again.'
      }</div>`
    : state.fieldErrors && Object.keys(state.fieldErrors).length > 0
      ? `<div class="alert" role="alert"><strong>Please correct the highlighted fields.</strong></div>`
      : ''
  const email =
    session.customer_email === null
      ? field('email', 'Email', 'type="email" autocomplete="email" required', state, state.email ?? '')
      : `<p>Receipt to <strong>${escapeHtml(session.customer_email)}</strong></p>`
  const cards = TEST_CARDS.map(
    (c) => `<tr><td><code>${c.number.replace(/(\d{4})(?=\d)/g, '$1 ')}</code></td><td>${escapeHtml(c.label)}</td></tr>`,
  ).join('')
  return layout(
    `Pay ${view.merchant}`,
    `${backLink(view)}
<div class="card">
${summary(view)}
${alert}
<form method="post" action="/c/pay/${encodeURIComponent(session.id)}" novalidate>
<h2>Pay by card</h2>
${email}
${field('card_number', 'Card number', 'type="text" inputmode="numeric" autocomplete="cc-number" placeholder="1234 1234 1234 1234" required', state)}
<div class="row">
${field('card_expiry', 'Expiry date (MM / YY)', 'type="text" inputmode="numeric" autocomplete="cc-exp" placeholder="MM / YY" required', state)}
${field('card_cvc', 'Security code (CVC)', 'type="text" inputmode="numeric" autocomplete="cc-csc" placeholder="123" required', state)}
</div>
<button type="submit">Pay ${escapeHtml(total)}</button>
</form>
<details>
<summary>Test card numbers</summary>
<p>Use any future expiry date and any 3-digit CVC (4 digits for American Express).</p>
<table><thead><tr><th scope="col">Number</th><th scope="col">What happens</th></tr></thead><tbody>${cards}</tbody></table>
</details>
</div>`,
  )
}

export function renderChallengePage(view: PageView, challengeId: string): string {
  const { session } = view.record
  const total = formatAmount(view.record.total.amount, view.record.total.currency, view.locale)
  return layout(
    'Confirm your payment',
    `<div class="card">
<h1>Confirm your payment</h1>
<p>Your card issuer asks you to confirm the payment of <strong>${escapeHtml(total)}</strong> to ${escapeHtml(view.merchant)}.</p>
<div class="notice" role="note">This is a test 3D Secure check: choose whether the authentication passes or fails.</div>
<form method="post" action="/c/pay/${encodeURIComponent(session.id)}/authenticate">
<input type="hidden" name="challenge" value="${escapeHtml(challengeId)}">
<button type="submit" name="result" value="complete">Complete authentication</button>
<button type="submit" name="result" value="fail" class="secondary">Fail authentication</button>
</form>
</div>`,
  )
}

export function renderClosedPage(view: PageView): string {
  const { session } = view.record
  if (session.status === 'complete') {
    const next = session.success_url
      ? `<a class="button" href="${escapeHtml(session.success_url.replaceAll('{CHECKOUT_SESSION_ID}', session.id))}">Continue</a>`
      : ''
    return layout(
      'Payment complete',
      `<div class="card"><h1>Payment complete</h1><p>This payment to ${escapeHtml(view.merchant)} has already been made. Nothing more to pay.</p>${next}</div>`,
    )
  }
  return layout(
    'Payment page expired',
    `${backLink(view)}<div class="card"><h1>This payment page has expired</h1><p>The payment to ${escapeHtml(view.merchant)} can no longer be made here and no money was taken. Go back to ${escapeHtml(view.merchant)} to get a new payment link.</p></div>`,
  )
}

export function renderNotFoundPage(): string {
  return layout(
    'Payment page not found',
    `<div class="card"><h1>Payment page not found</h1><p>There is no payment at this address. Check the link you were sent.</p></div>`,
  )
}
