import { inject } from 'vitest'
import './context'

export interface CaughtMail {
  id: string
  subject: string
  text: string
  html: string
  to: { address: string; name?: string }[]
  time: string
}

async function allMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${inject('e2e').maildevURL}/api/email`)
  if (!res.ok) throw new Error(`The mail catcher answered ${res.status}`)
  return (await res.json()) as CaughtMail[]
}

const sentTo = (mail: CaughtMail, to: string) => mail.to.some((t) => t.address.toLowerCase() === to.toLowerCase())

/** Ids of the mail already caught for an address, to tell the next one apart from them. */
export async function mailIdsTo(to: string): Promise<string[]> {
  return (await allMail()).filter((m) => sentTo(m, to)).map((m) => m.id)
}

/**
 * Waits for the newest e-mail to `to` whose subject contains `subjectIncludes`, read from the mail
 * catcher's API. `excluding` (from mailIdsTo) skips mail that was there before the action under test.
 */
export async function readLatestMail(
  to: string,
  subjectIncludes: string,
  opts: { excluding?: readonly string[]; timeoutMs?: number } = {},
): Promise<CaughtMail> {
  const deadline = Date.now() + (opts.timeoutMs ?? 15_000)
  const old = new Set(opts.excluding ?? [])
  for (;;) {
    const match = (await allMail())
      .filter((m) => sentTo(m, to) && m.subject.includes(subjectIncludes) && !old.has(m.id))
      .sort((a, b) => Date.parse(a.time) - Date.parse(b.time))
      .at(-1)
    if (match) return match
    if (Date.now() > deadline)
      throw new Error(`No e-mail to ${to} with “${subjectIncludes}” in its subject arrived within ${opts.timeoutMs ?? 15_000} ms`)
    await new Promise((r) => setTimeout(r, 150))
  }
}

/**
 * The first link in the e-mail's text that points at the app under test (sign-in links, estimate
 * links…), optionally the first whose path starts with `pathPrefix`.
 */
export function linkFrom(mail: CaughtMail, pathPrefix = '/'): URL {
  const base = new URL(inject('e2e').baseURL)
  for (const found of mail.text.matchAll(/https?:\/\/[^\s"<>]+/g)) {
    const url = new URL(found[0])
    if (url.origin === base.origin && url.pathname.startsWith(pathPrefix)) return url
  }
  throw new Error(`No link to ${base.origin}${pathPrefix} in the e-mail “${mail.subject}”:\n${mail.text}`)
}
