/**
 * The one way an e-mail body is built: a message is a list of blocks, and the plain-text and HTML
 * bodies are made from the same blocks, so both always say the same words. Every module that sends
 * mail (sign-in, estimates, portal, payments, invoices) builds its messages here.
 */

/** A paragraph, a button-like link, a quoted passage (the customer's own words), or small print. */
export type EmailBlock = { text: string } | { link: string; label: string; showAddress?: boolean } | { quote: string } | { small: string }

export interface EmailContent {
  subject: string
  text: string
  html: string
}

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c)
}

const paragraph = (text: string) => escapeHtml(text).replace(/\n/g, '<br>')

function textOf(b: EmailBlock): string {
  if ('text' in b) return b.text
  if ('link' in b) return `${b.label}: ${b.link}`
  if ('quote' in b) return b.quote.replace(/^/gm, '> ')
  return b.small
}

function htmlOf(b: EmailBlock): string {
  if ('text' in b) return `<p>${paragraph(b.text)}</p>`
  if ('link' in b) {
    const button = `<p><a href="${escapeHtml(b.link)}" style="display:inline-block;background:#1F3A4D;color:#ffffff;padding:12px 20px;border-radius:6px;text-decoration:none">${escapeHtml(b.label)}</a></p>`
    // Some mail programs hide styled links; the address itself is then there to copy.
    return b.showAddress
      ? `${button}\n<p style="font-size:14px;color:#444">Or copy this address into your browser:<br>${escapeHtml(b.link)}</p>`
      : button
  }
  if ('quote' in b)
    return `<blockquote style="border-left:4px solid #C8642B;margin:0;padding:4px 12px;color:#333">${paragraph(b.quote)}</blockquote>`
  return `<p style="font-size:14px;color:#444">${paragraph(b.small)}</p>`
}

export function renderEmail(subject: string, blocks: EmailBlock[]): EmailContent {
  const text = blocks.map(textOf).join('\n\n')
  const html = `<!doctype html><html><body style="font-family:Lato,Arial,sans-serif;color:#1b1b1b;max-width:560px">
${blocks.map(htmlOf).join('\n')}
</body></html>`
  return { subject, text, html }
}
