import { renderEmail } from '../../lib/email-layout'
import type { MailMessage } from '../../lib/mailer'

export function signInEmail(opts: {
  to: string
  name: string
  workshopName: string
  link: string
  minutes: number
  forCustomer: boolean
  invitedBy?: string
}): MailMessage {
  const subject = opts.forCustomer
    ? `Your link to ${opts.workshopName}`
    : opts.invitedBy
      ? `You have been added to ${opts.workshopName} on Tickover`
      : `Sign in to Tickover — ${opts.workshopName}`
  const what = opts.forCustomer
    ? `see your vehicles and estimates from ${opts.workshopName}`
    : `sign in to Tickover for ${opts.workshopName}`
  const email = renderEmail(subject, [
    { text: `Hello ${opts.name},` },
    ...(opts.invitedBy ? [{ text: `${opts.invitedBy} has added you to ${opts.workshopName} on Tickover.` }] : []),
    { text: `Use this link to ${what}:` },
    { link: opts.link, label: opts.forCustomer ? 'Open my account' : 'Sign in', showAddress: true },
    {
      small: `The link works once and only for the next ${opts.minutes} minutes. If you did not ask for it, you can ignore this e-mail: nobody can sign in without the link.`,
    },
  ])
  return { to: opts.to, ...email, fromName: opts.forCustomer ? opts.workshopName : `Tickover for ${opts.workshopName}` }
}
