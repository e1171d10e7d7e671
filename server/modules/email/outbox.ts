import type { Database } from '../../db/client'

/**
 * The outbox: every e-mail sent on a workshop's behalf is written to outbound_emails and handed
 * to the PostgreSQL-backed queue, so a mail server that is down delays a message and loses nothing.
 */

/** An attachment rendered when the message is sent, so a retry always sends the same document. */
export type OutboundAttachment = { type: 'estimate-pdf'; versionId: string; filename: string }

export interface OutboundMessage {
  workshopId: string
  estimateId?: string | null
  /** What the message is for ("estimate.sent", "estimate.confirmed"), shown to the advisor. */
  kind: string
  to: string
  subject: string
  text: string
  html: string
  replyTo?: string | null
  fromName?: string | null
  attachments?: OutboundAttachment[]
}

export interface EmailOutbox {
  /**
   * Records the message and queues it. Pass the caller's transaction so the message exists only
   * if the change it reports is committed.
   */
  queue(message: OutboundMessage, tx?: Pick<Database, 'insert' | 'execute'>): Promise<{ id: string }>
  /** Queues a failed or sent message again (the advisor's "Send again"). */
  resend(workshopId: string, emailId: string): Promise<void>
}
