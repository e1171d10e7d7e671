import type { CancellationInfo } from '../../../shared/schemas/portal'
import type { EstimateSnapshot } from '../../../shared/schemas/estimates'

/**
 * The cancellation information shown beside the decision, in our own plain words. It follows
 * the content of the UK's rules for contracts agreed away from the trader's premises (a 14-day
 * period; paying for work done at the customer's request before cancelling; no right to cancel
 * once the work is finished; a model form the customer may use) — from memory of those rules,
 * not a copy of their text. The workshop's own terms and local law prevail, and every page and
 * e-mail that shows these words shows the notice with them.
 */
export const CANCELLATION_DAYS = 14

export const CANCELLATION_NOTICE = 'General guidance, not legal advice; the workshop’s own terms and local law prevail.'

export function cancellationInfo(snapshot: EstimateSnapshot): CancellationInfo {
  const w = snapshot.workshop
  const address = [...w.addressLines, w.postcode].filter((part): part is string => Boolean(part)).join(', ')
  const contacts = [address, w.email, w.phone].filter(Boolean).join(' · ')
  return {
    trader: { name: w.name, addressLines: w.addressLines, postcode: w.postcode, phone: w.phone, email: w.email, vatNumber: w.vatNumber },
    periodDays: CANCELLATION_DAYS,
    periodText: [
      `Because you are agreeing to this work away from ${w.name}’s premises, you can usually cancel within ${CANCELLATION_DAYS} days of the day you confirm, without giving a reason.`,
      `To cancel, tell ${w.name} clearly before those ${CANCELLATION_DAYS} days end — by e-mail, letter or phone, using the details below. You may use the form below, but you do not have to.`,
      `If you ask for the work to start within the ${CANCELLATION_DAYS} days and then cancel, you may have to pay for the work done up to the moment you told the workshop. Once the work is completely finished, you can no longer cancel it.`,
      `If you cancel, any money you have paid is returned within ${CANCELLATION_DAYS} days of your telling the workshop, less the cost of work already done at your request, to the card you paid with.`,
    ],
    startWithinPeriodText: `Please start the work within the ${CANCELLATION_DAYS}-day cancellation period. I understand that if I then cancel I may have to pay for work already done, and that I cannot cancel once the work is finished.`,
    modelForm: {
      title: 'Cancellation form (fill in and send only if you want to cancel)',
      lines: [
        `To: ${w.name}${contacts ? ` — ${contacts}` : ''}`,
        `I cancel my contract for the following work: estimate ${snapshot.reference}, version ${snapshot.version}, on ${snapshot.vehicle.registration}.`,
        'Confirmed on (date):',
        'Your name:',
        'Your address:',
        'Your signature (only if you send this form on paper):',
        'Date:',
      ],
    },
    notice: CANCELLATION_NOTICE,
  }
}
