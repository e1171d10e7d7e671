import type { Env } from '../../env'
import type { AuditContext } from '../../lib/audit'
import { GoneError, NotFoundError } from '../../lib/errors'
import type { EmailOutbox } from '../email/outbox'
import { itemOf } from './decision-rules'
import { estimateEntry, freshLink, notYours, portalUrls, versionEntry } from './portal-access'
import { staffQuestionOf } from './portal-answers'
import { answerEmail, fromWorkshop, questionEmail } from './portal.emails'
import type { PortalRepoPart } from './portal.repo'
import type { CustomerPrincipal, StaffPrincipal } from '../../../shared/schemas/auth'
import type { AnswerQuestion, AskQuestion, PortalQuestion, StaffQuestion } from '../../../shared/schemas/portal'

export interface PortalQuestionsDeps {
  repo: PortalRepoPart<
    'estimate' | 'versions' | 'customer' | 'questions' | 'insertQuestion' | 'lockQuestion' | 'answerQuestion' | 'linkExpiry' | 'issueLink'
  >
  outbox: EmailOutbox
  env: Pick<Env, 'PUBLIC_BASE_URL'>
}

/** A customer's questions on an item, e-mailed to the workshop, and the advisor's answers, e-mailed back with a link. */
export function createPortalQuestionsService(deps: PortalQuestionsDeps) {
  const { repo, outbox } = deps
  const db = repo.db
  const urls = portalUrls(deps.env.PUBLIC_BASE_URL)

  return {
    async ask(ctx: AuditContext, me: CustomerPrincipal, estimateId: string, input: AskQuestion): Promise<PortalQuestion> {
      return repo.transaction(async (tx) => {
        const estimate = await repo.estimate(tx, me.workshop.id, estimateId)
        const latest = (await repo.versions(tx, me.workshop.id, estimateId)).at(-1)
        if (!estimate || !latest || latest.snapshot.customer.id !== me.id) throw notYours()
        if (estimate.withdrawnAt)
          throw new GoneError('The workshop has withdrawn this estimate. Please contact them directly.', 'withdrawn')
        const s = latest.snapshot
        const item = itemOf(s, input.itemId)
        const row = await repo.insertQuestion(tx, {
          workshopId: me.workshop.id,
          estimateId,
          versionId: latest.id,
          itemId: item.id,
          customerId: me.id,
          question: input.question,
        })
        if (s.workshop.email) {
          const mail = questionEmail(s, me.name, item, input.question, urls.staffEstimate(estimateId))
          await outbox.queue(
            {
              workshopId: me.workshop.id,
              estimateId,
              kind: 'estimate.question',
              to: s.workshop.email,
              ...mail,
              replyTo: me.email,
            },
            tx,
          )
        }
        await repo.recordAudit(
          tx,
          ctx,
          versionEntry(latest, 'estimate.question_asked', {
            item: `${item.number}: ${item.title}`,
            questionId: row.id,
          }),
        )
        await repo.publishLive(tx, {
          type: 'estimate.question',
          workshopId: me.workshop.id,
          estimateId,
          summary: `${me.name} asked about item ${item.number}: ${input.question}`.slice(0, 300),
        })
        return {
          id: row.id,
          itemId: row.itemId,
          version: latest.version,
          question: row.question,
          answer: null,
          askedAt: row.askedAt.toISOString(),
          answeredAt: null,
        }
      })
    },

    async staffQuestions(me: StaffPrincipal, estimateId: string): Promise<StaffQuestion[]> {
      const [estimate, versions] = await Promise.all([
        repo.estimate(db, me.workshop.id, estimateId),
        repo.versions(db, me.workshop.id, estimateId),
      ])
      if (!estimate) throw new NotFoundError('No such estimate in this workshop.')
      const rows = await repo.questions(db, me.workshop.id, estimateId)
      return rows.map((r) => staffQuestionOf(r, versions))
    },

    /** The advisor's answer, e-mailed to the customer with a fresh link to the current version when it can still be decided on. */
    async answer(
      ctx: AuditContext,
      me: StaffPrincipal,
      estimateId: string,
      questionId: string,
      input: AnswerQuestion,
    ): Promise<StaffQuestion> {
      const saved = await repo.transaction(async (tx) => {
        const estimate = await repo.estimate(tx, me.workshop.id, estimateId)
        const question = estimate ? await repo.lockQuestion(tx, me.workshop.id, estimateId, questionId) : undefined
        if (!estimate || !question) throw new NotFoundError('No such question on this estimate.')
        const versions = await repo.versions(tx, me.workshop.id, estimateId)
        const latest = versions.at(-1)
        const askedOn = versions.find((v) => v.id === question.versionId)
        if (!latest || !askedOn) throw new Error('question without its version')
        await repo.answerQuestion(tx, question.id, input.answer, me.id)
        const customer = await repo.customer(tx, me.workshop.id, question.customerId)
        const item = askedOn.snapshot.items.find((i) => i.id === question.itemId)
        if (customer?.email && !customer.archivedAt) {
          const link =
            latest.snapshot.customer.id === customer.id
              ? await freshLink(repo, urls, tx, { workshopId: me.workshop.id, estimate, version: latest, customerId: customer.id })
              : null
          const mail = answerEmail(latest.snapshot, customer.name, item, question.question, input.answer, link)
          await outbox.queue(
            {
              workshopId: me.workshop.id,
              estimateId,
              kind: 'estimate.question_answered',
              to: customer.email,
              ...mail,
              ...fromWorkshop(latest.snapshot),
            },
            tx,
          )
        }
        await repo.recordAudit(
          tx,
          ctx,
          estimateEntry(me.workshop.id, estimateId, 'estimate.question_answered', {
            reference: latest.snapshot.reference,
            questionId,
            item: item ? `${item.number}: ${item.title}` : question.itemId,
            customer: customer?.name ?? null,
          }),
        )
        await repo.publishLive(tx, {
          type: 'estimate.question',
          workshopId: me.workshop.id,
          estimateId,
          summary:
            `${me.name} answered ${customer?.name ?? 'the customer'}’s question on ${item ? `item ${item.number}` : 'an item'}`.slice(
              0,
              300,
            ),
        })
        return versions
      })
      const rows = await repo.questions(db, me.workshop.id, estimateId)
      const row = rows.find((r) => r.question.id === questionId)
      if (!row) throw new NotFoundError('No such question on this estimate.')
      return staffQuestionOf(row, saved)
    },
  }
}

export type PortalQuestionsService = ReturnType<typeof createPortalQuestionsService>
