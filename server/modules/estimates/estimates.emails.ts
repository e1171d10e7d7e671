import { type EmailBlock, type EmailContent, renderEmail } from '../../lib/email-layout'
import { formatMoney } from '../../../shared/money'
import type { EstimateSnapshot } from '../../../shared/schemas/estimates'

/** To the customer: a version has been sent, with the link that opens it. */
export function estimateSentEmail(snapshot: EstimateSnapshot, link: string, proposedGross: number, supersedes: boolean): EmailContent {
  const money = formatMoney(proposedGross, snapshot.currency)
  const ref = `${snapshot.reference}${snapshot.version > 1 ? ` (version ${snapshot.version})` : ''}`
  const shop = snapshot.workshop.name
  const vehicle = `${snapshot.vehicle.make} ${snapshot.vehicle.model} (${snapshot.vehicle.registration})`
  const count = snapshot.items.length
  const blocks: EmailBlock[] = [
    { text: `Dear ${snapshot.customer.name},` },
    { text: `${shop} has prepared estimate ${ref} for your ${vehicle}.` },
    ...(supersedes
      ? [{ text: 'We have updated the estimate we sent earlier; this one replaces it, so please decide on each item again.' }]
      : []),
    {
      text: `It has ${count} item${count === 1 ? '' : 's'}; everything together comes to ${money}. You can approve or decline each item on its own.`,
    },
    { link, label: 'Open the estimate' },
    {
      small: `The link works until the end of ${snapshot.expiresOn} and opens this estimate only. Questions? Reply to this e-mail or ask on an item.`,
    },
    {
      small: [
        shop,
        [...snapshot.workshop.addressLines, snapshot.workshop.postcode].filter(Boolean).join(', '),
        snapshot.workshop.phone ?? '',
      ]
        .filter(Boolean)
        .join('\n'),
    },
  ]
  return renderEmail(`Estimate ${ref} from ${shop}`, blocks)
}
