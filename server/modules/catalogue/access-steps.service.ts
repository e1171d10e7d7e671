import { deleteOrRefuse, saveOrRefuseTaken } from '../../lib/db-errors'
import { NotFoundError } from '../../lib/errors'
import type { AccessStep, AccessStepInput } from '../../../shared/schemas/catalogue'
import type { LabourRepo } from './labour.repo'
import { graphOf, refuseInput, stepGraphIssues } from './labour.rules'
import type { LabourService } from './labour.service'

const noSuchStep = () => new NotFoundError('No such access step in this workshop.')

/** The owner's changes to access steps: the graph stays free of loops and every operation still covers its access time. */
export function createAccessStepsService(deps: { repo: LabourRepo; labour: LabourService }) {
  const { repo, labour } = deps

  async function save(workshopId: string, id: string | null, input: AccessStepInput): Promise<AccessStep> {
    await repo.transaction(async (tx) => {
      const graph = graphOf(await repo.steps(tx, workshopId))
      const current = id ? [...graph.values()].find((s) => s.id === id) : undefined
      if (id && !current) throw noSuchStep()
      // Links are by id, so a new code carries them along: the checks see the graph under the new code.
      const renamed = (code: string) => (current && code === current.code ? input.code : code)
      const reaching = await repo.bookedOperationsUsing(
        tx,
        workshopId,
        [...graph.values()].map((s) => s.id),
      )
      const operations = reaching.map((o) => ({ ...o, steps: o.steps.map(renamed) }))
      if (current && current.code !== input.code) {
        graph.delete(current.code)
        for (const s of graph.values()) s.includes = s.includes.map(renamed)
      }
      refuseInput(stepGraphIssues(graph, [input], operations))
      const saved = await saveOrRefuseTaken(
        () => repo.saveStep(tx, workshopId, id, { code: input.code, name: input.name, hours: input.hours }),
        `Another access step already has the code ${input.code}.`,
      )
      if (!saved) throw noSuchStep()
      await repo.setIncludes(tx, workshopId, new Map([[saved, input.includes]]), (code) => graph.get(code)?.id ?? '')
    })
    const saved = (await labour.listSteps(workshopId)).find((s) => s.code === input.code)
    if (!saved) throw noSuchStep()
    return saved
  }

  return {
    create: (workshopId: string, input: AccessStepInput) => save(workshopId, null, input),
    update: (workshopId: string, id: string, input: AccessStepInput) => save(workshopId, id, input),
    async remove(workshopId: string, id: string): Promise<void> {
      const removed = await deleteOrRefuse(
        () => repo.deleteStep(workshopId, id),
        'Operations or other access steps use this step, so it cannot be deleted. Take it off them first.',
      )
      if (!removed) throw noSuchStep()
    },
  }
}

export type AccessStepsService = ReturnType<typeof createAccessStepsService>
