/**
 * Labour operations, access steps, parts, pricing and clock times through the API: the rules
 * each write must keep, tenancy, and the clock-time median. Codes, hours, rates and costs are
 * test inputs made up for this file; expected prices are worked out from them by hand.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Part, TimeComparisonRow } from '../../shared/schemas/catalogue'
import { makeTestApp } from './helpers/app'
import { addOperations, addSteps } from './helpers/catalogue'
import { type Browser, type Fixture, makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
afterAll(() => t.close())

let shop: Fixture
let owner: Browser
let advisor: Browser
let technician: Browser

beforeAll(async () => {
  shop = await makeWorkshop(t.db, 'Catalogue Works')
  owner = await signIn(t.app, shop.owner.email)
  advisor = await signIn(t.app, shop.advisor.email)
  technician = await signIn(t.app, shop.technician.email)
}, 60_000)

describe('access steps', () => {
  it('refuses a step that would close a loop, naming the loop', async () => {
    const ids = await addSteps(owner, [
      { code: 'LOOP-WHEEL', name: 'Wheel off', hours: '0.3' },
      { code: 'LOOP-CALIPER', name: 'Caliper off', hours: '0.4', includes: ['LOOP-WHEEL'] },
      { code: 'LOOP-HUB', name: 'Hub off', hours: '1', includes: ['LOOP-CALIPER'] },
    ])
    const res = await owner
      .put(`/api/access-steps/${ids['LOOP-WHEEL']}`, { code: 'LOOP-WHEEL', name: 'Wheel off', hours: '0.3', includes: ['LOOP-HUB'] })
      .expect(422)
    expect(res.body.error.issues).toEqual([
      {
        path: ['body', 'includes'],
        message: 'Access steps cannot include each other in a loop: LOOP-WHEEL → LOOP-HUB → LOOP-CALIPER → LOOP-WHEEL.',
      },
    ])
    const steps = await owner.get('/api/access-steps').expect(200)
    expect(steps.body.items).toContainEqual(expect.objectContaining({ code: 'LOOP-WHEEL', includes: [] }))
  })

  it('refuses a step that includes itself', async () => {
    const res = await owner.post('/api/access-steps', { code: 'SELF', name: 'Self', hours: '1', includes: ['SELF'] }).expect(422)
    expect(res.body.error.issues[0].message).toMatch(/cannot include itself|No access step/)
  })

  it('counts a step reached by two paths once in the total', async () => {
    await addSteps(owner, [
      { code: 'DIAMOND-BASE', name: 'Base', hours: '0.5' },
      { code: 'DIAMOND-LEFT', name: 'Left', hours: '0.25', includes: ['DIAMOND-BASE'] },
      { code: 'DIAMOND-RIGHT', name: 'Right', hours: '0.25', includes: ['DIAMOND-BASE'] },
      { code: 'DIAMOND-TOP', name: 'Top', hours: '1', includes: ['DIAMOND-LEFT', 'DIAMOND-RIGHT'] },
    ])
    const steps = await owner.get('/api/access-steps').expect(200)
    // 1 + 0.25 + 0.25 + 0.5, the base once
    expect(steps.body.items).toContainEqual(expect.objectContaining({ code: 'DIAMOND-TOP', totalHours: '2' }))
  })

  it('refuses to delete a step that an operation uses, and deletes an unused one', async () => {
    const ids = await addSteps(owner, [
      { code: 'USED-STEP', name: 'Used', hours: '0.5' },
      { code: 'SPARE-STEP', name: 'Spare', hours: '0.5' },
    ])
    await addOperations(owner, [
      { code: 'USES-STEP', name: 'Uses a step', system: 'steering', side: 'none', bookHours: '1', accessSteps: ['USED-STEP'] },
    ])
    const refused = await owner.delete(`/api/access-steps/${ids['USED-STEP']}`).expect(409)
    expect(refused.body.error.code).toBe('in_use')
    await owner.delete(`/api/access-steps/${ids['SPARE-STEP']}`).expect(204)
  })

  it('refuses more step time than an operation books', async () => {
    const ids = await addSteps(owner, [{ code: 'LONG-STEP', name: 'Long', hours: '1' }])
    await addOperations(owner, [
      { code: 'SHORT-OP', name: 'Short job', system: 'steering', side: 'none', bookHours: '1.5', accessSteps: ['LONG-STEP'] },
    ])
    const res = await owner
      .put(`/api/access-steps/${ids['LONG-STEP']}`, { code: 'LONG-STEP', name: 'Long', hours: '2', includes: [] })
      .expect(422)
    expect(res.body.error.issues[0]).toMatchObject({ path: ['body', 'hours'], message: expect.stringContaining('SHORT-OP') })

    const op = await owner
      .post('/api/labour-operations', {
        code: 'TOO-SHORT',
        name: 'Too short',
        system: 'steering',
        side: 'none',
        bookHours: '0.5',
        category: 'standard',
        accessSteps: ['LONG-STEP'],
      })
      .expect(422)
    expect(op.body.error.issues[0]).toMatchObject({
      path: ['body', 'bookHours'],
      message: expect.stringContaining('book time includes access'),
    })
  })
})

describe('labour operations', () => {
  it('refuses a code already in use with 409', async () => {
    await addOperations(owner, [{ code: 'DUP-1', name: 'First', system: 'steering', side: 'none', bookHours: '1' }])
    const res = await owner
      .post('/api/labour-operations', {
        code: 'dup-1',
        name: 'Second',
        system: 'steering',
        side: 'none',
        bookHours: '1',
        category: 'standard',
      })
      .expect(409)
    expect(res.body.error.code).toBe('code_taken')
  })

  it('keeps hundredths of an hour and refuses thousandths', async () => {
    const ok = await owner
      .post('/api/labour-operations', {
        code: 'HUNDREDTHS',
        name: 'Fine time',
        system: 'steering',
        side: 'none',
        bookHours: '0.25',
        category: 'standard',
      })
      .expect(201)
    expect(ok.body.bookHours).toBe('0.25')
    const bad = await owner
      .post('/api/labour-operations', {
        code: 'THOUSANDTHS',
        name: 'Too fine',
        system: 'steering',
        side: 'none',
        bookHours: '0.125',
        category: 'standard',
      })
      .expect(422)
    expect(bad.body.error.issues[0].path).toEqual(['body', 'bookHours'])
  })

  it('lets the advisor read but not change the table', async () => {
    const ids = await addOperations(owner, [{ code: 'READ-ONLY', name: 'Read only', system: 'steering', side: 'none', bookHours: '1' }])
    await advisor.get(`/api/labour-operations/${ids['READ-ONLY']}`).expect(200)
    await advisor
      .put(`/api/labour-operations/${ids['READ-ONLY']}`, {
        code: 'READ-ONLY',
        name: 'Changed',
        system: 'steering',
        side: 'none',
        bookHours: '1',
        category: 'standard',
      })
      .expect(403)
  })
})

describe('markup bands', () => {
  const bands = [
    { fromCostMinor: 0, markupPercent: '50' },
    { fromCostMinor: 1000, markupPercent: '40' },
    { fromCostMinor: 5000, markupPercent: '25' },
  ]

  it('refuses bands that do not start at zero or do not rise', async () => {
    const rates = { standard: 8000, diagnostic: null, specialist: null }
    const gap = await owner
      .put('/api/pricing', { rates, defaultTaxRate: '20', markupBands: [{ fromCostMinor: 100, markupPercent: '10' }] })
      .expect(422)
    expect(gap.body.error.issues[0].path).toEqual(['body', 'markupBands', 0, 'fromCostMinor'])
    const order = await owner.put('/api/pricing', { rates, defaultTaxRate: '20', markupBands: [bands[0], bands[2], bands[1]] }).expect(422)
    expect(order.body.error.issues[0].path).toEqual(['body', 'markupBands', 2, 'fromCostMinor'])
  })

  it('prices a cost exactly on a boundary with the band that starts there', async () => {
    await owner
      .put('/api/pricing', { rates: { standard: 8000, diagnostic: null, specialist: null }, defaultTaxRate: '20', markupBands: bands })
      .expect(200)
    const cases: [number, number][] = [
      [999, 1499], // 999 × 1.5 = 1498.5, half up
      [1000, 1400], // on the boundary: 40 %, not 50 %
      [4999, 6999], // 4999 × 1.4 = 6998.6
      [5000, 6250], // on the boundary: 25 %
      [0, 0],
    ]
    for (const [cost, expected] of cases) {
      const res = await owner.post('/api/parts', { partNumber: `EDGE-${cost}`, description: 'Edge case', costMinor: cost }).expect(201)
      expect((res.body as Part).sellPriceMinor, `cost ${cost}`).toBe(expected)
      expect((res.body as Part).priceSource).toBe('markup')
    }
  })

  it('keeps a fixed sell price whatever the bands say', async () => {
    const res = await owner
      .post('/api/parts', { partNumber: 'FIXED-1', description: 'Fixed price', costMinor: 1000, sellPriceMinor: 1234 })
      .expect(201)
    expect(res.body).toMatchObject({ sellPriceMinor: 1234, priceSource: 'fixed', markupPercent: null })
  })

  it('fills the default tax rate when a part has none', async () => {
    const res = await owner.post('/api/parts', { partNumber: 'TAX-DEFAULT', description: 'Default tax', costMinor: 100 }).expect(201)
    expect(res.body.taxRate).toBe('20')
  })

  it('records a pricing change in the audit log', async () => {
    await owner
      .put('/api/pricing', { rates: { standard: 8000, diagnostic: null, specialist: null }, defaultTaxRate: '20', markupBands: bands })
      .expect(200)
    await owner
      .put('/api/pricing', { rates: { standard: 8100, diagnostic: null, specialist: null }, defaultTaxRate: '20', markupBands: bands })
      .expect(200)
    const log = await owner.get('/api/audit-events?action=settings.changed').expect(200)
    expect(log.body.items[0]).toMatchObject({
      subjectType: 'pricing',
      details: { changed: { 'standard rate': { from: '8000', to: '8100' } } },
    })
  })
})

describe('clock time against book time', () => {
  it('records a technician’s actual time and shows the median and count to the owner', async () => {
    const ids = await addOperations(owner, [{ code: 'CLOCKED', name: 'Clocked job', system: 'rear_axle', side: 'none', bookHours: '2' }])
    const path = `/api/labour-operations/${ids.CLOCKED}/clock-times`
    for (const hours of ['1', '4', '2']) await technician.post(path, { hours, jobId: shop.job.id }).expect(201)

    const median = async () => {
      const res = await owner.get('/api/labour-operations/time-comparison').expect(200)
      return (res.body.items as TimeComparisonRow[]).find((r) => r.code === 'CLOCKED')
    }
    expect(await median()).toMatchObject({ bookHours: '2', medianHours: '2', count: 3 })
    await technician.post(path, { hours: '1.5' }).expect(201)
    // Four values 1, 1.5, 2, 4: the median is halfway between the middle two.
    expect(await median()).toMatchObject({ medianHours: '1.75', count: 4 })
  })

  it('refuses a job of another workshop', async () => {
    const other = await makeWorkshop(t.db, 'Clock Elsewhere')
    const ids = await addOperations(owner, [{ code: 'CLOCK-JOB', name: 'Clock job', system: 'rear_axle', side: 'none', bookHours: '1' }])
    const res = await technician
      .post(`/api/labour-operations/${ids['CLOCK-JOB']}/clock-times`, { hours: '1', jobId: other.job.id })
      .expect(404)
    expect(res.body.error.message).toMatch(/job/)
  })
})

describe('tenancy', () => {
  it('answers 404 for another workshop’s operation, step and part, and leaves them alone', async () => {
    const other = await makeWorkshop(t.db, 'Tenancy Elsewhere')
    const otherOwner = await signIn(t.app, other.owner.email)
    const opIds = await addOperations(otherOwner, [
      { code: 'THEIRS', name: 'Their operation', system: 'steering', side: 'none', bookHours: '1' },
    ])
    const stepIds = await addSteps(otherOwner, [{ code: 'THEIR-STEP', name: 'Their step', hours: '1' }])
    const part = await otherOwner.post('/api/parts', { partNumber: 'THEIR-PART', description: 'Their part', costMinor: 100 }).expect(201)
    const op = opIds.THEIRS
    const step = stepIds['THEIR-STEP']

    await owner.get(`/api/labour-operations/${op}`).expect(404)
    await owner
      .put(`/api/labour-operations/${op}`, {
        code: 'MINE',
        name: 'Taken',
        system: 'steering',
        side: 'none',
        bookHours: '1',
        category: 'standard',
      })
      .expect(404)
    await owner.post(`/api/labour-operations/${op}/archive`).expect(404)
    await technician.post(`/api/labour-operations/${op}/clock-times`, { hours: '1' }).expect(404)
    await owner.put(`/api/access-steps/${step}`, { code: 'MINE', name: 'Taken', hours: '1' }).expect(404)
    await owner.delete(`/api/access-steps/${step}`).expect(404)
    await owner.get(`/api/parts/${part.body.id}`).expect(404)
    await owner.put(`/api/parts/${part.body.id}`, { partNumber: 'MINE', description: 'Taken', costMinor: 1 }).expect(404)

    const theirs = await otherOwner.get(`/api/labour-operations/${op}`).expect(200)
    expect(theirs.body).toMatchObject({ code: 'THEIRS', archived: false })
    const steps = await otherOwner.get('/api/access-steps').expect(200)
    expect(steps.body.items).toEqual([expect.objectContaining({ code: 'THEIR-STEP' })])
    await otherOwner.get(`/api/parts/${part.body.id}`).expect(200)
  })

  it('refuses an access step of another workshop by code', async () => {
    const other = await makeWorkshop(t.db, 'Tenancy Steps Elsewhere')
    const otherOwner = await signIn(t.app, other.owner.email)
    await addSteps(otherOwner, [{ code: 'ONLY-THEIRS', name: 'Theirs', hours: '0.5' }])
    const res = await owner
      .post('/api/labour-operations', {
        code: 'BORROW',
        name: 'Borrow',
        system: 'steering',
        side: 'none',
        bookHours: '1',
        category: 'standard',
        accessSteps: ['ONLY-THEIRS'],
      })
      .expect(422)
    expect(res.body.error.issues[0].message).toContain('ONLY-THEIRS')
  })
})
