import nodemailer from 'nodemailer'
import type { Logger } from 'pino'
import type { Env } from '../env'

export interface MailMessage {
  to: string
  subject: string
  text: string
  html: string
  replyTo?: string
  fromName?: string
  attachments?: { filename: string; content: Buffer | Uint8Array; contentType: string }[]
}

export interface Mailer {
  send(message: MailMessage): Promise<void>
}

export function createMailer(env: Env): Mailer {
  const transport = nodemailer.createTransport({
    host: env.SMTP_HOST,
    port: env.SMTP_PORT,
    secure: env.SMTP_SECURE,
    auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASS ?? '' } : undefined,
    connectionTimeout: 5000,
    greetingTimeout: 5000,
  })
  const fromAddress = env.MAIL_FROM
  return {
    async send(message) {
      const from = message.fromName ? { name: message.fromName, address: addressOf(fromAddress) } : fromAddress
      const attachments = message.attachments?.map((a) => ({
        filename: a.filename,
        content: Buffer.isBuffer(a.content) ? a.content : Buffer.from(a.content.buffer, a.content.byteOffset, a.content.byteLength),
        contentType: a.contentType,
      }))
      await transport.sendMail({
        from,
        to: message.to,
        subject: message.subject,
        text: message.text,
        html: message.html,
        replyTo: message.replyTo,
        attachments,
      })
    },
  }
}

function addressOf(from: string): string {
  return /<([^>]+)>/.exec(from)?.[1] ?? from
}

/** Sends without holding up the request; a failure is logged with enough to resend by hand. */
export function sendInBackground(mailer: Mailer, logger: Logger, message: MailMessage, what: string): void {
  mailer.send(message).catch((err: unknown) => {
    logger.error({ err, what, subject: message.subject }, 'e-mail could not be sent')
  })
}
