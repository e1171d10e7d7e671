import type { RequestHandler } from 'express'
import type { z } from 'zod'
import type { Permission } from '../../shared/auth/policy'
import type { StaffPrincipal } from '../../shared/schemas/auth'
import { IdParamsSchema } from '../../shared/schemas/common'
import { staffOf } from '../middleware/auth'
import { type AuditContext, auditContextOf } from './audit'
import { handle } from '../middleware/validate'
import { staffWith } from './access'
import type { RouteGroup, RouteTable } from './route-table'

export interface RecordService<Input, Query, Item> {
  list(workshopId: string, q: Query): Promise<unknown>
  get(workshopId: string, id: string): Promise<Item>
  create(workshopId: string, input: Input): Promise<Item>
  update(workshopId: string, id: string, input: Input): Promise<Item>
  /** Records that are only ever archived (the catalogue's) have no delete route. */
  remove?(workshopId: string, id: string): Promise<void>
  setArchived?(workshopId: string, id: string, archived: boolean): Promise<Item>
}

const byId = { params: IdParamsSchema }

/** What a route about one record hands its service call: who asks, for which workshop, about which record, with what. */
export interface RecordCall<Input = undefined> {
  workshopId: string
  id: string
  input: Input
  me: StaffPrincipal
  ctx: AuditContext
}

type Run<Input, Out> = (call: RecordCall<Input>) => Promise<Out>

function callOf<Input>(req: Parameters<typeof auditContextOf>[0], id: string, input: Input): RecordCall<Input> {
  const me = staffOf(req)
  return { workshopId: me.workshop.id, id, input, me, ctx: auditContextOf(req) }
}

/** Answers with what `run` makes of the record id in the path (`/:id`). */
export function answerById(run: Run<undefined, unknown>, status = 200): RequestHandler[] {
  return handle(byId, async (req, res) => {
    res.status(status).json(await run(callOf(req, req.params.id, undefined)))
  })
}

/** The same, with a request body checked against `body`. */
export function answerByIdWith<Input>(body: z.ZodType<Input>, run: Run<Input, unknown>, status = 200): RequestHandler[] {
  return handle({ ...byId, body }, async (req, res) => {
    res.status(status).json(await run(callOf(req, req.params.id, req.body)))
  })
}

/** Runs `run` for the record id in the path and answers 204 with no body. */
export function removeById(run: Run<undefined, void>): RequestHandler[] {
  return handle(byId, async (req, res) => {
    await run(callOf(req, req.params.id, undefined))
    res.status(204).end()
  })
}

export interface RecordRouteOptions<Input, Query, Item> {
  read: Permission
  write: Permission
  input: z.ZodType<Input>
  listQuery: z.ZodType<Query>
  service: RecordService<Input, Query, Item>
}

/**
 * The list/read/create/update/archive/delete routes of a workshop record under `path` in `g`,
 * scoped to the caller's workshop. Paths such as `${path}/export` go into `g` first, or `/:id` takes them.
 */
export function addRecordRoutes<Input, Query, Item>(g: RouteGroup, path: string, opts: RecordRouteOptions<Input, Query, Item>) {
  const { service } = opts
  const ws = (req: { user?: Express.User }) => staffOf(req).workshop.id
  const read = staffWith(opts.read)
  const write = staffWith(opts.write)

  g.get(
    path,
    read,
    handle({ query: opts.listQuery }, async (req, res) => {
      res.json(await service.list(ws(req), req.query))
    }),
  )
  g.get(
    `${path}/:id`,
    read,
    answerById(({ workshopId, id }) => service.get(workshopId, id)),
  )
  g.post(
    path,
    write,
    handle({ body: opts.input }, async (req, res) => {
      res.status(201).json(await service.create(ws(req), req.body))
    }),
  )
  g.put(
    `${path}/:id`,
    write,
    answerByIdWith(opts.input, ({ workshopId, id, input }) => service.update(workshopId, id, input)),
  )
  const setArchived = service.setArchived?.bind(service)
  if (setArchived) {
    g.post(
      `${path}/:id/archive`,
      write,
      answerById(({ workshopId, id }) => setArchived(workshopId, id, true)),
    )
    g.post(
      `${path}/:id/restore`,
      write,
      answerById(({ workshopId, id }) => setArchived(workshopId, id, false)),
    )
  }
  const remove = service.remove?.bind(service)
  if (remove) {
    g.delete(
      `${path}/:id`,
      write,
      removeById(({ workshopId, id }) => remove(workshopId, id)),
    )
  }
}

/** A workshop record's routes in a group of their own at `base`. */
export function recordRoutes<Input, Query, Item>(table: RouteTable, base: string, opts: RecordRouteOptions<Input, Query, Item>) {
  const g = table.group(base)
  addRecordRoutes(g, '', opts)
  return g
}
