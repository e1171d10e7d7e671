/**
 * CSV imports and exports of labour operations, access steps and parts. Codes, hours and prices
 * are test inputs made up for this file. CSV quoting follows RFC 4180.
 */
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { labourOperations, parts } from '../../server/db/schema'
import type { ImportReport, LabourOperation, Part } from '../../shared/schemas/catalogue'
import { makeTestApp } from './helpers/app'
import { addOperations, addSteps, csv, sendCsv } from './helpers/catalogue'
import { type Browser, type Fixture, makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
afterAll(() => t.close())

const OPS_HEADER = 'code,name,synonyms,system,vehicle_groups,side,book_hours,category,access_steps,notes'

async function freshShop(name: string): Promise<{ shop: Fixture; owner: Browser }> {
  const shop = await makeWorkshop(t.db, name)
  return { shop, owner: await signIn(t.app, shop.owner.email) }
}

async function operationsOf(shop: Fixture) {
  const rows = await t.db.select().from(labourOperations).where(eq(labourOperations.workshopId, shop.workshop.id))
  return new Map(rows.map((r) => [r.code, r]))
}

describe('labour operations import', () => {
  let shop: Fixture
  let owner: Browser

  beforeAll(async () => {
    ;({ shop, owner } = await freshShop('Import Works'))
    await addSteps(owner, [{ code: 'HUB-OFF', name: 'Hub off and on', hours: '1' }])
    await addOperations(owner, [
      { code: 'OP-KEEP', name: 'Replace steering damper', system: 'steering', side: 'none', bookHours: '0.5' },
      { code: 'OP-CHANGE', name: 'Replace track rod end', system: 'steering', side: 'left', bookHours: '0.8' },
    ])
  })

  const file = csv(
    OPS_HEADER,
    'OP-KEEP,Replace steering damper,,steering,,none,0.5,standard,,',
    'OP-CHANGE,Replace track rod end,TRE,steering,,left,0.9,standard,,',
    'OP-NEW-1,Replace CV joint,constant velocity joint|CV,Front axle,coil-sprung-live-axle,left,3.5,standard,HUB-OFF,"Boot kit, grease"',
    'op-new-2,Overhaul rear differential,diff,rear_axle,,none,5.5,specialist,,',
  )

  it('dry run reports what would be added, changed and left, and changes nothing', async () => {
    const before = await operationsOf(shop)
    const res = await sendCsv(owner, '/api/labour-operations/import/dry-run', file).expect(200)
    const report = res.body as ImportReport

    expect(report.errors).toEqual([])
    expect(report.summary).toEqual({ added: 2, changed: 1, unchanged: 1 })
    expect(report.committed).toBe(false)
    expect(report.rows).toEqual([
      { row: 2, key: 'OP-KEEP', action: 'keep', changed: [] },
      { row: 3, key: 'OP-CHANGE', action: 'change', changed: ['synonyms', 'book_hours'] },
      { row: 4, key: 'OP-NEW-1', action: 'add', changed: [] },
      { row: 5, key: 'OP-NEW-2', action: 'add', changed: [] },
    ])
    const after = await operationsOf(shop)
    expect([...after.keys()].sort()).toEqual([...before.keys()].sort())
    expect(after.get('OP-CHANGE')?.bookHours).toBe('0.80')
  })

  it('commit applies the same plan, labels and all', async () => {
    const res = await sendCsv(owner, '/api/labour-operations/import', file).expect(200)
    expect(res.body).toMatchObject({ summary: { added: 2, changed: 1, unchanged: 1 }, committed: true })

    const found = await owner.get('/api/labour-operations?q=OP-NEW-1').expect(200)
    const op = (found.body.items as LabourOperation[])[0]
    expect(op).toMatchObject({
      code: 'OP-NEW-1',
      synonyms: ['constant velocity joint', 'CV'],
      system: 'front_axle',
      vehicleGroups: ['coil-sprung-live-axle'],
      bookHours: '3.5',
      notes: 'Boot kit, grease',
      accessSteps: [{ code: 'HUB-OFF' }],
    })
    const stored = await operationsOf(shop)
    expect(stored.get('OP-CHANGE')?.bookHours).toBe('0.90')
    expect(stored.get('OP-CHANGE')?.synonyms).toEqual(['TRE'])
    expect(stored.has('OP-NEW-2')).toBe(true)

    const again = await sendCsv(owner, '/api/labour-operations/import/dry-run', file).expect(200)
    expect(again.body.summary).toEqual({ added: 0, changed: 0, unchanged: 4 })
  })

  it('a file with one bad row commits nothing and names the row, column and problem', async () => {
    const before = await operationsOf(shop)
    const bad = csv(
      OPS_HEADER,
      'OP-GOOD-1,Replace rear pinion oil seal,,rear_axle,,none,1.8,standard,,',
      'OP-BAD,Replace prop shaft,,prop_shafts,,none,two hours,standard,,',
      'OP-GOOD-2,Replace steering box,,steering,,none,3,standard,,',
    )
    const dry = await sendCsv(owner, '/api/labour-operations/import/dry-run', bad).expect(200)
    expect(dry.body.errors).toEqual([{ row: 3, column: 'book_hours', message: expect.stringMatching(/number like 1\.5/) }])
    expect(dry.body.summary).toEqual({ added: 2, changed: 0, unchanged: 0 })

    const commit = await sendCsv(owner, '/api/labour-operations/import', bad).expect(422)
    expect(commit.body.error.code).toBe('import_has_errors')
    expect(commit.body.error.issues).toEqual([{ path: [3, 'book_hours'], message: expect.any(String) }])
    const after = await operationsOf(shop)
    expect([...after.keys()].sort()).toEqual([...before.keys()].sort())
    expect(after.has('OP-GOOD-1')).toBe(false)
  })

  it('names every kind of problem on its own row and column', async () => {
    const res = await sendCsv(
      owner,
      '/api/labour-operations/import/dry-run',
      csv(
        OPS_HEADER,
        'OP-A,Something,,gearbox,,none,1,standard,,',
        'OP-B,Something,,steering,,middle,1,standard,,',
        'OP-C,Something,,steering,,none,1,standard,NO-SUCH-STEP,',
        'OP-D,Something,,steering,,none,0.5,standard,HUB-OFF,',
        'OP-A,Again,,steering,,none,1,standard,,',
        ',No code,,steering,,none,1,standard,,',
        'OP-E,Something,,steering,,none,1.234,standard,,',
      ),
    )
    const byRow = Object.fromEntries((res.body as ImportReport).errors.map((e) => [e.row, e]))
    expect(byRow[2]).toMatchObject({ column: 'system' })
    expect(byRow[3]).toMatchObject({ column: 'side' })
    expect(byRow[4]).toMatchObject({ column: 'access_steps', message: expect.stringContaining('NO-SUCH-STEP') })
    // 0.5 h booked but the hub step alone takes 1 h: book time includes access time.
    expect(byRow[5]).toMatchObject({ column: 'book_hours', message: expect.stringContaining('access steps take 1 h') })
    expect(byRow[7]).toMatchObject({ column: 'code' })
    expect(byRow[8]).toMatchObject({ column: 'book_hours' })
    // Row 6 repeats row 2's code; row 2 itself is invalid, so the repeat is judged on its own.
    expect(byRow[6]).toBeUndefined()
  })

  it('refuses a repeated code in the same file', async () => {
    const res = await sendCsv(
      owner,
      '/api/labour-operations/import/dry-run',
      csv(OPS_HEADER, 'OP-TWICE,First,,steering,,none,1,standard,,', 'op-twice,Second,,steering,,none,1,standard,,'),
    )
    expect(res.body.errors).toEqual([{ row: 3, column: 'code', message: '"OP-TWICE" is already on row 2.' }])
  })

  it('checks the header: unknown and missing columns are row 1', async () => {
    const res = await sendCsv(
      owner,
      '/api/labour-operations/import/dry-run',
      csv('code,name,hours,system,side,category', 'X,Y,1,steering,none,standard'),
    )
    expect(res.body.errors).toEqual([
      { row: 1, column: 'hours', message: expect.stringContaining('Unknown column') },
      { row: 1, column: 'book_hours', message: 'This column is missing from the header row.' },
    ])
    expect(res.body.rows).toEqual([])
  })

  it('reports a broken quote as a file problem, not a crash', async () => {
    const res = await sendCsv(
      owner,
      '/api/labour-operations/import/dry-run',
      csv(OPS_HEADER, 'OP-Q,"Unclosed,,steering,,none,1,standard,,'),
    )
    expect(res.status).toBe(200)
    expect(res.body.errors[0]).toMatchObject({ column: null, message: expect.stringContaining('quote') })
  })

  it('refuses a body that is not CSV', async () => {
    const res = await owner.post('/api/labour-operations/import/dry-run', { rows: [] }).expect(422)
    expect(res.body.error.code).toBe('validation_failed')
  })
})

describe('export → import round trip', () => {
  it('re-imports its own export as all unchanged, awkward text included', async () => {
    const { owner } = await freshShop('Round Trip Works')
    await addSteps(owner, [
      { code: 'WHEEL', name: 'Wheel off and on', hours: '0.3' },
      { code: 'HUB', name: 'Hub off, "the long way"', hours: '1.25', includes: ['WHEEL'] },
    ])
    await addOperations(owner, [
      {
        code: 'RT-1',
        name: '=SUM(A1) is not a formula',
        synonyms: ['+plus', 'comma, inside'],
        system: 'front_axle',
        side: 'left',
        bookHours: '2.5',
        accessSteps: ['HUB'],
        notes: 'Line one\nline two',
      },
      {
        code: 'RT-2',
        name: 'Plain name',
        system: 'rear_axle',
        side: 'none',
        bookHours: '0.05',
        vehicleGroups: ['a', 'b'],
        category: 'diagnostic',
      },
    ])

    const exported = await owner.get('/api/labour-operations/export').expect(200)
    expect(exported.headers['content-type']).toMatch(/^text\/csv/)
    expect(exported.headers['content-disposition']).toMatch(/^attachment; filename="?labour-operations\.csv"?$/)
    const text = exported.text
    // Spreadsheets would run a cell starting with "=" (OWASP: CSV injection); the export defuses it.
    expect(text).toContain("'=SUM(A1) is not a formula")

    const dry = await sendCsv(owner, '/api/labour-operations/import/dry-run', text).expect(200)
    expect(dry.body.errors).toEqual([])
    expect(dry.body.summary).toEqual({ added: 0, changed: 0, unchanged: 2 })

    const steps = await owner.get('/api/access-steps/export').expect(200)
    const stepsDry = await sendCsv(owner, '/api/access-steps/import/dry-run', steps.text).expect(200)
    expect(stepsDry.body.summary).toEqual({ added: 0, changed: 0, unchanged: 2 })

    // Into an empty workshop, the same files recreate the table exactly.
    const { owner: other } = await freshShop('Round Trip Copy')
    await sendCsv(other, '/api/access-steps/import', steps.text).expect(200)
    await sendCsv(other, '/api/labour-operations/import', text).expect(200)
    const copy = await other.get('/api/labour-operations/export').expect(200)
    expect(copy.text).toBe(text)
  })

  it('serves templates whose header the import accepts', async () => {
    const { owner } = await freshShop('Template Works')
    for (const table of ['labour-operations', 'access-steps', 'parts']) {
      const template = await owner.get(`/api/${table}/template`).expect(200)
      const res = await sendCsv(owner, `/api/${table}/import/dry-run`, template.text).expect(200)
      expect(res.body.errors, table).toEqual([])
      expect(res.body.summary, table).toEqual({ added: 1, changed: 0, unchanged: 0 })
    }
  })
})

describe('access steps import', () => {
  const HEADER = 'code,name,hours,includes'

  it('accepts includes that point at steps further down the same file', async () => {
    const { owner } = await freshShop('Steps Import Works')
    const res = await sendCsv(
      owner,
      '/api/access-steps/import',
      csv(HEADER, 'HUB,Hub off,1,WHEEL|CALIPER', 'WHEEL,Wheel off,0.3,', 'CALIPER,Caliper off,0.4,'),
    ).expect(200)
    expect(res.body.summary).toEqual({ added: 3, changed: 0, unchanged: 0 })
    const steps = await owner.get('/api/access-steps').expect(200)
    expect(steps.body.items).toContainEqual(expect.objectContaining({ code: 'HUB', includes: ['CALIPER', 'WHEEL'], totalHours: '1.7' }))
  })

  it('refuses a loop, naming it, and writes nothing', async () => {
    const { owner } = await freshShop('Steps Loop Works')
    await addSteps(owner, [{ code: 'A', name: 'Step A', hours: '1' }])
    const file = csv(HEADER, 'B,Step B,1,C', 'C,Step C,1,A', 'A,Step A,1,B')
    const dry = await sendCsv(owner, '/api/access-steps/import/dry-run', file).expect(200)
    expect(dry.body.errors).toEqual([
      { row: 4, column: 'includes', message: 'Access steps cannot include each other in a loop: A → B → C → A.' },
    ])
    await sendCsv(owner, '/api/access-steps/import', file).expect(422)
    const steps = await owner.get('/api/access-steps').expect(200)
    expect(steps.body.items.map((s: { code: string }) => s.code)).toEqual(['A'])
  })
})

describe('parts import', () => {
  const HEADER = 'part_number,description,supplier_ref,cost,sell_price,tax_rate,stock_quantity'

  it('reads money in major units, fills defaults, and prices from the bands', async () => {
    const { shop, owner } = await freshShop('Parts Import Works')
    await owner
      .put('/api/pricing', {
        rates: { standard: null, diagnostic: null, specialist: null },
        defaultTaxRate: '20',
        markupBands: [{ fromCostMinor: 0, markupPercent: '50' }],
      })
      .expect(200)
    const file = csv(
      HEADER,
      'UJ-100,Universal joint,SUP-1,12.50,,,4',
      'SEAL-7,Pinion seal,,3,9.99,0,',
      'KIT-9,Swivel kit,,120.5,,5,',
      '+ADAPTER-1,=2+3 adapter,-X,1,,,',
    )
    const res = await sendCsv(owner, '/api/parts/import', file).expect(200)
    expect(res.body.summary).toEqual({ added: 4, changed: 0, unchanged: 0 })

    const rows = await t.db.select().from(parts).where(eq(parts.workshopId, shop.workshop.id))
    const byNumber = Object.fromEntries(rows.map((r) => [r.partNumber, r]))
    expect(byNumber['UJ-100']).toMatchObject({
      costMinor: 1250,
      sellPriceMinor: null,
      taxRate: '20.00',
      stockQuantity: 4,
      supplierRef: 'SUP-1',
    })
    expect(byNumber['SEAL-7']).toMatchObject({
      costMinor: 300,
      sellPriceMinor: 999,
      taxRate: '0.00',
      stockQuantity: null,
      supplierRef: null,
    })
    expect(byNumber['KIT-9']).toMatchObject({ costMinor: 12050, taxRate: '5.00' })

    const list = await owner.get('/api/parts?q=UJ-100').expect(200)
    // 1250 × 1.5, from the test's own 50 % band
    expect((list.body.items as Part[])[0]).toMatchObject({ sellPriceMinor: 1875, priceSource: 'markup', markupPercent: '50' })

    const exported = await owner.get('/api/parts/export').expect(200)
    expect(exported.text).toContain('UJ-100,Universal joint,SUP-1,12.50,,20,4')
    // Cells a spreadsheet would run as formulas go out defused (OWASP: CSV injection) and come back as they were.
    expect(exported.text).toContain("'+ADAPTER-1,'=2+3 adapter,'-X,1.00,,20,")
    expect(byNumber['+ADAPTER-1']).toMatchObject({ description: '=2+3 adapter', supplierRef: '-X' })
    const again = await sendCsv(owner, '/api/parts/import/dry-run', exported.text).expect(200)
    expect(again.body.summary).toEqual({ added: 0, changed: 0, unchanged: 4 })
  })

  it('says how to write money it cannot read', async () => {
    const { owner } = await freshShop('Parts Money Works')
    const res = await sendCsv(
      owner,
      '/api/parts/import/dry-run',
      csv(HEADER, 'P-1,Thing,,£12.50,,,', 'P-2,Thing,,1.234,,,', 'P-3,Thing,,1,1,,2.5'),
    ).expect(200)
    expect(res.body.errors).toEqual([
      { row: 2, column: 'cost', message: expect.stringContaining('like 12.50') },
      { row: 3, column: 'cost', message: expect.stringContaining('like 12.50') },
      { row: 4, column: 'stock_quantity', message: expect.stringContaining('whole number') },
    ])
  })

  it('reads a spreadsheet saved with semicolons', async () => {
    const { owner } = await freshShop('Parts Semicolon Works')
    const res = await sendCsv(
      owner,
      '/api/parts/import/dry-run',
      csv(HEADER.replaceAll(',', ';'), 'P-1;Thing, with comma;;2.00;;;'),
    ).expect(200)
    expect(res.body.errors).toEqual([])
    expect(res.body.summary.added).toBe(1)
  })
})

describe('a large file', () => {
  it('imports thousands of operations in one transaction', async () => {
    const { shop, owner } = await freshShop('Bulk Import Works')
    const lines = Array.from({ length: 3000 }, (_, i) => `BULK-${i},Replace part number ${i},,front_axle,,none,${(i % 9) + 1}.5,standard,,`)
    const res = await sendCsv(owner, '/api/labour-operations/import', csv(OPS_HEADER, ...lines)).expect(200)
    expect(res.body.summary.added).toBe(3000)
    expect((await operationsOf(shop)).size).toBe(3000)
    const found = await owner.get('/api/labour-operations?q=BULK-2999').expect(200)
    expect(found.body.items[0].code).toBe('BULK-2999')
  }, 60_000)
})
