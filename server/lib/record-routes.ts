import type { z } from 'zod'
import type { Permission } from '../../shared/auth/policy'
import { IdParamsSchema } from '../../shared/schemas/common'
import { staffOf } from '../middleware/auth'
import { handle } from '../middleware/validate'
import { type RouteTable, staffWith } from './route-table'

export interface RecordService<Input, Query, Item> {
  list(workshopId: string, q: Query): Promise<unknown>
  get(workshopId: string, id: string): Promise<Item>
  create(workshopId: string, input: Input): Promise<Item>
  update(workshopId: string, id: string, input: Input): Promise<Item>
  remove(workshopId: string, id: string): Promise<void>
  setArchived?(workshopId: string, id: string, archived: boolean): Promise<Item>
}

/** The list/read/create/update/archive/delete routes every workshop record has, scoped to the caller's workshop. */
export function recordRoutes<Input, Query, Item>(
  table: RouteTable,
  base: string,
  opts: {
    read: Permission
    write: Permission
    input: z.ZodType<Input>
    listQuery: z.ZodType<Query>
    service: RecordService<Input, Query, Item>
  },
) {
  const { service } = opts
  const g = table.group(base)
  const ws = (req: { user?: Express.User }) => staffOf(req).workshop.id
  const read = staffWith(opts.read)
  const write = staffWith(opts.write)
  const byId = { params: IdParamsSchema }

  g.get(
    '',
    read,
    handle({ query: opts.listQuery }, async (req, res) => {
      res.json(await service.list(ws(req), req.query))
    }),
  )
  g.get(
    '/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await service.get(ws(req), req.params.id))
    }),
  )
  g.post(
    '',
    write,
    handle({ body: opts.input }, async (req, res) => {
      res.status(201).json(await service.create(ws(req), req.body))
    }),
  )
  g.put(
    '/:id',
    write,
    handle({ ...byId, body: opts.input }, async (req, res) => {
      res.json(await service.update(ws(req), req.params.id, req.body))
    }),
  )
  const setArchived = service.setArchived?.bind(service)
  if (setArchived) {
    g.post(
      '/:id/archive',
      write,
      handle(byId, async (req, res) => {
        res.json(await setArchived(ws(req), req.params.id, true))
      }),
    )
    g.post(
      '/:id/restore',
      write,
      handle(byId, async (req, res) => {
        res.json(await setArchived(ws(req), req.params.id, false))
      }),
    )
  }
  g.delete(
    '/:id',
    write,
    handle(byId, async (req, res) => {
      await service.remove(ws(req), req.params.id)
      res.status(204).end()
    }),
  )
  return g
}
