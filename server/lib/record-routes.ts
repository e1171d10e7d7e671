import type { Request } from 'express'
import type { z } from 'zod'
import type { Permission } from '../../shared/auth/policy'
import { IdParamsSchema } from '../../shared/schemas/common'
import { staffOf } from '../middleware/auth'
import { validate } from '../middleware/validate'
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
  const ws = (req: Request) => staffOf(req).workshop.id
  const id = (req: Request) => (req.params as { id: string }).id
  const read = staffWith(opts.read)
  const write = staffWith(opts.write)

  g.get('', read, validate({ query: opts.listQuery }), async (req, res) => {
    res.json(await service.list(ws(req), req.query as unknown as Query))
  })
  g.get('/:id', read, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await service.get(ws(req), id(req)))
  })
  g.post('', write, validate({ body: opts.input }), async (req, res) => {
    res.status(201).json(await service.create(ws(req), req.body as Input))
  })
  g.put('/:id', write, validate({ params: IdParamsSchema, body: opts.input }), async (req, res) => {
    res.json(await service.update(ws(req), id(req), req.body as Input))
  })
  const setArchived = service.setArchived?.bind(service)
  if (setArchived) {
    g.post('/:id/archive', write, validate({ params: IdParamsSchema }), async (req, res) => {
      res.json(await setArchived(ws(req), id(req), true))
    })
    g.post('/:id/restore', write, validate({ params: IdParamsSchema }), async (req, res) => {
      res.json(await setArchived(ws(req), id(req), false))
    })
  }
  g.delete('/:id', write, validate({ params: IdParamsSchema }), async (req, res) => {
    await service.remove(ws(req), id(req))
    res.status(204).end()
  })
  return g
}
