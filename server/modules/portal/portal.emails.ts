import { type EmailBlock as Block, type EmailContent as Email, renderEmail as render } from '../../lib/email-layout'
import { formatMoney } from '../../../shared/money'
import type { EstimateResult } from '../../../shared/estimate/contract'
import type { EstimateSnapshot, SnapshotItem } from '../../../shared/schemas/estimates'
import { CANCELLATION_DAYS, CANCELLATION_NOTICE } from './cancellation'

const workshopFooter = (s: EstimateSnapshot): Block => ({
  small: [
    s.workshop.name,
    [...s.workshop.addressLines, s.workshop.postcode].filter(Boolean).join(', '),
    s.workshop.phone ?? '',
    s.workshop.email ?? '',
  ]
    .filter(Boolean)
    .join('\n'),
})

const versionWords = (s: EstimateSnapshot) => `${s.reference}${s.version > 1 ? ` (version ${s.version})` : ''}`

/** A message to the customer comes from the workshop: under its name, and replies go to its address. */
export const fromWorkshop = (s: EstimateSnapshot) => ({ replyTo: s.workshop.email, fromName: s.workshop.name })

export const itemWords = (item: Pick<SnapshotItem, 'number' | 'title'>) => `item ${item.number} (${item.title})`

/** The fresh link asked for from an expired or replaced one. */
export function renewedLinkEmail(s: EstimateSnapshot, customerName: string, link: string): Email {
  return render(`Your link to estimate ${versionWords(s)} from ${s.workshop.name}`, [
    { text: `Dear ${customerName},` },
    {
      text: `Here is a fresh link to estimate ${versionWords(s)} for your ${s.vehicle.make} ${s.vehicle.model} (${s.vehicle.registration}). It is the latest version the workshop has sent you.`,
    },
    { link, label: 'Open the estimate' },
    {
      small: `The link works until the end of ${s.expiresOn} and opens this estimate only. If you did not ask for it, you can ignore this e-mail.`,
    },
    workshopFooter(s),
  ])
}

/** To the workshop: a customer's question on an item. */
export function questionEmail(s: EstimateSnapshot, customerName: string, item: SnapshotItem, question: string, estimateUrl: string): Email {
  return render(`Question on ${s.reference}, ${itemWords(item)} — ${customerName}`, [
    { text: `${customerName} asked about ${itemWords(item)} on estimate ${versionWords(s)} (${s.vehicle.registration}):` },
    { quote: question },
    { link: estimateUrl, label: 'Answer in Tickover' },
    { small: 'Answering in Tickover keeps the answer with the estimate and sends the customer a link back to it.' },
  ])
}

/** To the customer: the workshop's answer, with a way back to the estimate when it can still be decided. */
export function answerEmail(
  s: EstimateSnapshot,
  customerName: string,
  item: SnapshotItem | undefined,
  question: string,
  answer: string,
  link: string | null,
): Email {
  return render(`${s.workshop.name} answered your question on ${s.reference}`, [
    { text: `Dear ${customerName},` },
    { text: `You asked about ${item ? itemWords(item) : 'an item'} on estimate ${versionWords(s)}:` },
    { quote: question },
    { text: `${s.workshop.name} answered:` },
    { quote: answer },
    link
      ? { link, label: 'Back to the estimate' }
      : { text: 'This estimate can no longer be decided on online; please contact the workshop.' },
    workshopFooter(s),
  ])
}

export interface ConfirmationFacts {
  snapshot: EstimateSnapshot
  result: EstimateResult
  customerName: string
  confirmedAt: Date
  startWithinCancellationPeriod: boolean
  estimateUrl: string
}

function decisionLines(f: ConfirmationFacts): string {
  return f.result.items
    .map(
      (i) =>
        `Item ${i.number}: ${i.title} — ${i.decision === 'approved' ? `approved, ${formatMoney(i.gross, f.result.currency)}` : 'declined'}`,
    )
    .join('\n')
}

/** To the customer, with the PDF of the decision record attached by the outbox. */
export function confirmationEmail(f: ConfirmationFacts): Email {
  const s = f.snapshot
  const money = (minor: number) => formatMoney(minor, f.result.currency)
  const approved = f.result.approved
  const anyApproved = f.result.items.some((i) => i.decision === 'approved')
  return render(`Your decision on estimate ${versionWords(s)} — ${s.workshop.name}`, [
    { text: `Dear ${f.customerName},` },
    {
      text: anyApproved
        ? `Thank you. You confirmed your decision on estimate ${versionWords(s)} for ${s.vehicle.registration}. The approved work comes to ${money(approved.gross)} including tax.`
        : `Thank you. You declined every item on estimate ${versionWords(s)} for ${s.vehicle.registration}, so no work from it will be done and nothing is due.`,
    },
    { text: decisionLines(f) },
    approved.deposit > 0
      ? { text: `A deposit of ${money(approved.deposit)} is due before work starts. You can pay it by card from the estimate page.` }
      : { text: anyApproved ? 'No deposit is due.' : 'Nothing is due.' },
    ...(anyApproved ? [{ link: f.estimateUrl, label: approved.deposit > 0 ? 'Pay the deposit' : 'See the estimate' }] : []),
    {
      small: `The attached PDF is your record: what you were shown, what you chose and when. You can usually cancel within ${CANCELLATION_DAYS} days${f.startWithinCancellationPeriod ? '; you asked for work to start within that period, so you may have to pay for work done before you cancel' : ''}. ${CANCELLATION_NOTICE}`,
    },
    workshopFooter(s),
  ])
}

/** To the workshop: a copy notice that the customer confirmed. */
export function confirmationCopyEmail(f: ConfirmationFacts, staffUrl: string): Email {
  const s = f.snapshot
  const money = (minor: number) => formatMoney(minor, f.result.currency)
  const approved = f.result.approved
  return render(`${f.customerName} confirmed ${versionWords(s)} — ${money(approved.gross)} approved`, [
    { text: `${f.customerName} confirmed estimate ${versionWords(s)} for ${s.vehicle.registration}.` },
    { text: decisionLines(f) },
    { text: `Approved: ${money(approved.gross)} including tax. Deposit due: ${approved.deposit > 0 ? money(approved.deposit) : 'none'}.` },
    {
      text: f.startWithinCancellationPeriod
        ? 'They asked for work to start within the cancellation period.'
        : 'They did not ask for work to start within the cancellation period.',
    },
    { link: staffUrl, label: 'Open the estimate in Tickover' },
  ])
}
