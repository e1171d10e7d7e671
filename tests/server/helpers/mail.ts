interface CaughtMail {
  id: string
  subject: string
  text: string
  html: string
  to: { address: string }[]
  time: string
}

/** Polls the mail catcher's API (maildev's /api/email) for the newest message to an address. */
export async function waitForMail(to: string, opts: { since?: number; timeoutMs?: number; subject?: RegExp } = {}): Promise<CaughtMail> {
  const base = process.env.MAILDEV_URL
  if (!base) throw new Error('MAILDEV_URL is not set: run the tests through npm test or the vitest global setup')
  const deadline = Date.now() + (opts.timeoutMs ?? 8000)
  while (Date.now() < deadline) {
    const res = await fetch(`${base}/api/email`)
    const all = (await res.json()) as CaughtMail[]
    const match = all
      .filter((m) => m.to.some((t) => t.address.toLowerCase() === to.toLowerCase()))
      .filter((m) => !opts.since || Date.parse(m.time) >= opts.since - 1000)
      .filter((m) => !opts.subject || opts.subject.test(m.subject))
      .at(-1)
    if (match) return match
    await new Promise((r) => setTimeout(r, 100))
  }
  throw new Error(`No e-mail to ${to} arrived in time`)
}

export async function mailsTo(to: string): Promise<CaughtMail[]> {
  const res = await fetch(`${process.env.MAILDEV_URL}/api/email`)
  const all = (await res.json()) as CaughtMail[]
  return all.filter((m) => m.to.some((t) => t.address.toLowerCase() === to.toLowerCase()))
}

export function linkIn(mail: CaughtMail): URL {
  const found = /https?:\/\/\S+[?&]token=[^\s"<]+/.exec(mail.text)
  if (!found) throw new Error(`No sign-in link in: ${mail.text}`)
  return new URL(found[0])
}
