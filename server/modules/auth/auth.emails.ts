import { escapeHtml } from '../../lib/email-layout'
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
  const intro = opts.invitedBy ? `${opts.invitedBy} has added you to ${opts.workshopName} on Tickover.` : null
  const what = opts.forCustomer
    ? `see your vehicles and estimates from ${opts.workshopName}`
    : `sign in to Tickover for ${opts.workshopName}`
  const text = [
    `Hello ${opts.name},`,
    '',
    ...(intro ? [intro, ''] : []),
    `Use this link to ${what}:`,
    opts.link,
    '',
    `The link works once and only for the next ${opts.minutes} minutes.`,
    'If you did not ask for it, you can ignore this e-mail: nobody can sign in without the link.',
  ].join('\n')
  const html = `<!doctype html><html><body style="font-family:Lato,Arial,sans-serif;color:#1b1b1b;line-height:1.5">
<p>Hello ${escapeHtml(opts.name)},</p>
${intro ? `<p>${escapeHtml(intro)}</p>` : ''}
<p>Use this link to ${escapeHtml(what)}:</p>
<p><a href="${escapeHtml(opts.link)}" style="display:inline-block;padding:12px 20px;background:#1F3A4D;color:#ffffff;text-decoration:none;border-radius:6px">${opts.forCustomer ? 'Open my account' : 'Sign in'}</a></p>
<p style="font-size:14px;color:#444">Or copy this address into your browser:<br>${escapeHtml(opts.link)}</p>
<p style="font-size:14px;color:#444">The link works once and only for the next ${opts.minutes} minutes. If you did not ask for it, you can ignore this e-mail: nobody can sign in without the link.</p>
</body></html>`
  return {
    to: opts.to,
    subject: opts.forCustomer
      ? `Your link to ${opts.workshopName}`
      : opts.invitedBy
        ? `You have been added to ${opts.workshopName} on Tickover`
        : `Sign in to Tickover — ${opts.workshopName}`,
    text,
    html,
    fromName: opts.forCustomer ? opts.workshopName : `Tickover for ${opts.workshopName}`,
  }
}
