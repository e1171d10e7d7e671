import type { Request } from 'express'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import type { PortalService } from './portal.service'
import { AnswerQuestionSchema, PortalEstimateParamsSchema, QuestionParamsSchema, type AnswerQuestion } from '../../../shared/schemas/portal'

/** The workshop's side of customers' questions: read them with the estimate, answer by e-mail with a link back. */
export function estimateQuestionRoutes(table: RouteTable, service: PortalService) {
  const g = table.group('/estimates')
  const paramsOf = (req: Request) => req.params as { id: string; questionId: string }

  g.get('/:id/questions', staffWith('estimates:read'), validate({ params: PortalEstimateParamsSchema }), async (req, res) => {
    const me = staffOf(req)
    res.json({ items: await service.staffQuestions(me, paramsOf(req).id) })
  })

  g.post(
    '/:id/questions/:questionId/answer',
    staffWith('estimates:write'),
    validate({ params: QuestionParamsSchema, body: AnswerQuestionSchema }),
    async (req, res) => {
      const { id, questionId } = paramsOf(req)
      res.json(await service.answer(req, staffOf(req), id, questionId, req.body as AnswerQuestion))
    },
  )

  return g
}
