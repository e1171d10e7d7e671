import { saveOrRefuseTaken } from '../../lib/db-errors'
import type { LabourOperation, LabourOperationInput } from '../../../shared/schemas/catalogue'
import type { LabourRepo } from './labour.repo'
import { graphOf, operationIssues, refuseInput, valuesOf } from './labour.rules'
import { type LabourService, noSuchOperation } from './labour.service'

/** The owner's changes to labour operations, each checked against the workshop's access steps. */
export function createLabourOperationsService(deps: { repo: LabourRepo; labour: LabourService }) {
  const { repo, labour } = deps

  async function save(workshopId: string, id: string | null, input: LabourOperationInput): Promise<LabourOperation> {
    const savedId = await repo.transaction(async (tx) => {
      const graph = graphOf(await repo.steps(tx, workshopId))
      refuseInput(operationIssues(input, graph))
      const saved = await saveOrRefuseTaken(
        () => repo.saveOperation(tx, workshopId, id, valuesOf(input)),
        `Another operation already has the code ${input.code}.`,
      )
      if (!saved) throw noSuchOperation()
      await repo.setOperationSteps(tx, workshopId, new Map([[saved, input.accessSteps]]), (code) => graph.get(code)?.id ?? '')
      return saved
    })
    return labour.get(workshopId, savedId)
  }

  return {
    create: (workshopId: string, input: LabourOperationInput) => save(workshopId, null, input),
    update: (workshopId: string, id: string, input: LabourOperationInput) => save(workshopId, id, input),
    async setArchived(workshopId: string, id: string, archived: boolean): Promise<LabourOperation> {
      if (!(await repo.setOperationArchived(workshopId, id, archived))) throw noSuchOperation()
      return labour.get(workshopId, id)
    },
  }
}

export type LabourOperationsService = ReturnType<typeof createLabourOperationsService>
