import { auditContextOf } from '../../lib/audit'
import { answerById } from '../../lib/record-routes'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { PortalQuestionsService } from './portal-questions.service'
import { AnswerQuestionSchema, QuestionParamsSchema } from '../../../shared/schemas/portal'

/** The workshop's side of customers' questions: read them with the estimate, answer by e-mail with a link back. */
export function estimateQuestionRoutes(table: RouteTable, service: PortalQuestionsService) {
  const g = table.group('/estimates')

  g.get(
    '/:id/questions',
    staffWith('estimates:read'),
    answerById(async ({ id, me }) => ({ items: await service.staffQuestions(me, id) })),
  )

  g.post(
    '/:id/questions/:questionId/answer',
    staffWith('estimates:write'),
    handle({ params: QuestionParamsSchema, body: AnswerQuestionSchema }, async (req, res) => {
      const { id, questionId } = req.params
      res.json(await service.answer(auditContextOf(req), staffOf(req), id, questionId, req.body))
    }),
  )

  return g
}
