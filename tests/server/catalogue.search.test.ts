/**
 * Search quality of the labour-time lookup. The operations, codes and hours below are test inputs
 * made up for this file; what is checked is which one the lookup puts first.
 * Trade words and abbreviations (UJ, diff, TRE, CV, kingpin) are common practice.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { LabourOperation } from '../../shared/schemas/catalogue'
import { makeTestApp } from './helpers/app'
import { addOperations, addSteps } from './helpers/catalogue'
import { type Browser, type Fixture, makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
let shop: Fixture
let owner: Browser
let advisor: Browser

beforeAll(async () => {
  shop = await makeWorkshop(t.db, 'Search Works')
  owner = await signIn(t.app, shop.owner.email)
  advisor = await signIn(t.app, shop.advisor.email)
  await owner
    .put('/api/pricing', { rates: { standard: 8000, diagnostic: 9000, specialist: 11000 }, defaultTaxRate: '20', markupBands: [] })
    .expect(200)
  await addSteps(owner, [
    { code: 'FH-WHEEL', name: 'Front wheel off and on', hours: '0.3' },
    { code: 'FH-HUB', name: 'Front hub off and on', hours: '1', includes: ['FH-WHEEL'] },
  ])
  await addOperations(owner, [
    {
      code: 'PS-UJ-R',
      name: 'Replace rear prop shaft universal joint',
      synonyms: ['UJ', 'cross and bearing'],
      system: 'prop_shafts',
      side: 'none',
      bookHours: '1.5',
    },
    { code: 'PS-SHAFT-F', name: 'Replace front prop shaft', synonyms: ['propshaft'], system: 'prop_shafts', side: 'none', bookHours: '1' },
    {
      code: 'FA-DIFF-OH',
      name: 'Overhaul front differential',
      synonyms: ['diff rebuild'],
      system: 'front_axle',
      side: 'none',
      bookHours: '6',
      category: 'specialist',
    },
    {
      code: 'RA-DIFF-OH',
      name: 'Overhaul rear differential',
      synonyms: ['diff rebuild'],
      system: 'rear_axle',
      side: 'none',
      bookHours: '5.5',
      category: 'specialist',
    },
    {
      code: 'FA-SWS-L',
      name: 'Replace swivel housing seal',
      synonyms: ['swivel ball seal'],
      system: 'front_axle',
      side: 'left',
      bookHours: '2.2',
      vehicleGroups: ['group-a'],
    },
    {
      code: 'FA-SWS-R',
      name: 'Replace swivel housing seal',
      synonyms: ['swivel ball seal'],
      system: 'front_axle',
      side: 'right',
      bookHours: '2.2',
      vehicleGroups: ['group-b'],
    },
    {
      code: 'FA-SWB-L',
      name: 'Replace swivel pin bearings',
      synonyms: ['kingpin bearings'],
      system: 'front_axle',
      side: 'left',
      bookHours: '3',
    },
    {
      code: 'FA-CV-L',
      name: 'Replace CV joint',
      synonyms: ['constant velocity joint'],
      system: 'front_axle',
      side: 'left',
      bookHours: '3.5',
      accessSteps: ['FH-HUB'],
    },
    {
      code: 'HB-BRG-FL',
      name: 'Replace front hub bearing',
      synonyms: ['wheel bearing'],
      system: 'hubs_bearings',
      side: 'left',
      bookHours: '2',
      accessSteps: ['FH-HUB'],
    },
    { code: 'TB-OUT-BRG', name: 'Replace transfer box output bearing', system: 'transfer_box', side: 'none', bookHours: '4' },
    {
      code: 'TB-DLOCK',
      name: 'Repair centre differential lock',
      synonyms: ['diff lock'],
      system: 'transfer_box',
      side: 'none',
      bookHours: '2.5',
    },
    { code: 'ST-TRE-L', name: 'Replace track rod end', synonyms: ['TRE'], system: 'steering', side: 'left', bookHours: '0.8' },
    { code: 'ST-DAMP', name: 'Replace steering damper', system: 'steering', side: 'none', bookHours: '0.5' },
    { code: 'RA-PIN-SEAL', name: 'Replace rear pinion oil seal', system: 'rear_axle', side: 'none', bookHours: '1.8' },
    {
      code: 'DX-NOISE',
      name: 'Trace drivetrain noise on road test',
      system: 'rear_axle',
      side: 'none',
      bookHours: '1',
      category: 'diagnostic',
    },
  ])
}, 60_000)

afterAll(() => t.close())

async function search(query: Record<string, string>, as: Browser = advisor): Promise<LabourOperation[]> {
  const res = await as.get(`/api/labour-operations?${new URLSearchParams(query)}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body.items as LabourOperation[]
}

const codes = (items: LabourOperation[]) => items.map((i) => i.code)

describe('labour lookup: search quality', () => {
  // One expected code, or the set the first result must come from when equally good answers exist.
  const table: { q: string; top: string | string[]; why: string }[] = [
    { q: 'UJ', top: 'PS-UJ-R', why: 'synonym, two letters' },
    { q: 'uj', top: 'PS-UJ-R', why: 'synonym in lower case' },
    { q: 'universal joint', top: 'PS-UJ-R', why: 'words of the name' },
    { q: 'cross and bearing', top: 'PS-UJ-R', why: 'a multi-word synonym; "and" is a stop word' },
    { q: 'diff', top: ['FA-DIFF-OH', 'RA-DIFF-OH'], why: 'abbreviation as synonym and as the start of "differential"' },
    { q: 'rear diff', top: 'RA-DIFF-OH', why: 'abbreviation with a qualifier' },
    { q: 'differential', top: ['FA-DIFF-OH', 'RA-DIFF-OH'], why: 'the full word' },
    { q: 'FA-SWS-R', top: 'FA-SWS-R', why: 'an exact code' },
    { q: 'fa sws r', top: 'FA-SWS-R', why: 'a code typed in lower case with spaces' },
    { q: 'RA-PIN', top: 'RA-PIN-SEAL', why: 'the start of a code' },
    { q: 'swivle seal', top: ['FA-SWS-L', 'FA-SWS-R'], why: 'a typo (transposed letters)' },
    { q: 'hub bearng', top: 'HB-BRG-FL', why: 'a typo (dropped letter)' },
    { q: 'dampr', top: 'ST-DAMP', why: 'a typo on its own' },
    { q: 'TRE', top: 'ST-TRE-L', why: 'an abbreviation synonym' },
    { q: 'track rod', top: 'ST-TRE-L', why: 'the start of the name' },
    { q: 'kingpin', top: 'FA-SWB-L', why: 'a synonym the name does not contain' },
    { q: 'constant velocity', top: 'FA-CV-L', why: 'a synonym spelled out' },
    { q: 'wheel bearings', top: 'HB-BRG-FL', why: 'a plural of a synonym' },
    { q: 'transfer output', top: 'TB-OUT-BRG', why: 'two words far apart in the name' },
    { q: 'pinion', top: 'RA-PIN-SEAL', why: 'one word of the name' },
    { q: 'diffe', top: ['FA-DIFF-OH', 'RA-DIFF-OH'], why: 'a word half typed, as the advisor types' },
  ]

  it.each(table)('"$q" → $top ($why)', async ({ q, top }) => {
    const items = await search({ q })
    expect(items.length).toBeGreaterThan(0)
    const first = items[0]?.code
    if (Array.isArray(top)) expect(top).toContain(first)
    else expect(first).toBe(top)
  })

  it('puts every swivel operation above anything else for the typo "swivle"', async () => {
    const items = await search({ q: 'swivle' })
    expect(codes(items).slice(0, 3).sort()).toEqual(['FA-SWB-L', 'FA-SWS-L', 'FA-SWS-R'])
  })

  it('finds nothing rather than everything for a word that is nowhere', async () => {
    const res = await advisor.get('/api/labour-operations?q=carburettor').expect(200)
    expect(res.body).toMatchObject({ items: [], total: 0 })
  })

  it('needs every word to match, so a qualifier narrows the list', async () => {
    const all = codes(await search({ q: 'replace' }))
    const rear = codes(await search({ q: 'replace rear' }))
    expect(all.length).toBeGreaterThan(rear.length)
    expect(rear.sort()).toEqual(['PS-UJ-R', 'RA-PIN-SEAL'])
  })

  it('lists the whole table by code when there is no query', async () => {
    const res = await advisor.get('/api/labour-operations?pageSize=100').expect(200)
    const listed = codes(res.body.items as LabourOperation[])
    expect(res.body.total).toBe(15)
    expect(listed).toEqual([...listed].sort())
  })
})

describe('labour lookup: filters', () => {
  it('narrows by vehicle group, keeping operations that apply to every group', async () => {
    const items = codes(await search({ q: 'swivel', vehicleGroup: 'group-b' }))
    expect(items).toContain('FA-SWS-R')
    expect(items).toContain('FA-SWB-L')
    expect(items).not.toContain('FA-SWS-L')
  })

  it('narrows by system', async () => {
    expect(codes(await search({ q: 'bearing', system: 'transfer_box' }))).toEqual(['TB-OUT-BRG'])
  })

  it('narrows by side, keeping operations that have no side', async () => {
    const right = codes(await search({ q: 'replace', side: 'right', pageSize: '100' }))
    expect(right).toContain('FA-SWS-R')
    expect(right).toContain('ST-DAMP')
    expect(right).not.toContain('FA-SWS-L')
    expect(right).not.toContain('ST-TRE-L')
  })

  it('combines filters with a query', async () => {
    expect(codes(await search({ q: 'seal', system: 'front_axle', side: 'left' }))).toEqual(['FA-SWS-L'])
  })

  it('refuses an unknown system with a validation error', async () => {
    const res = await advisor.get('/api/labour-operations?system=gearbox').expect(422)
    expect(res.body.error.issues[0].path).toEqual(['query', 'system'])
  })
})

describe('labour lookup: what a result shows', () => {
  it('shows hours, category, the price at the workshop rate and the access steps', async () => {
    const [cv] = await search({ q: 'FA-CV-L' })
    expect(cv).toMatchObject({
      code: 'FA-CV-L',
      bookHours: '3.5',
      category: 'standard',
      rateMinor: 8000,
      // 8000 × 3.5 h, computed by hand from the test's own inputs
      priceMinor: 28000,
      currency: 'GBP',
      accessSteps: [{ code: 'FH-HUB', name: 'Front hub off and on', hours: '1', includes: ['FH-WHEEL'] }],
      // 1 + 0.3: the hub step and the wheel step it includes
      accessHours: '1.3',
    })
  })

  it('prices each category at its own rate', async () => {
    const [diag] = await search({ q: 'DX-NOISE' })
    expect(diag).toMatchObject({ category: 'diagnostic', rateMinor: 9000, priceMinor: 9000 })
  })

  it('leaves archived operations out of the lookup', async () => {
    const [op] = await search({ q: 'ST-DAMP' }, owner)
    await owner.post(`/api/labour-operations/${op?.id}/archive`).expect(200)
    expect(codes(await search({ q: 'damper' }))).not.toContain('ST-DAMP')
    expect(codes(await search({ q: 'damper', archived: 'true' }, owner))).toEqual(['ST-DAMP'])
    await owner.post(`/api/labour-operations/${op?.id}/restore`).expect(200)
    expect(codes(await search({ q: 'damper' }))).toContain('ST-DAMP')
  })
})

describe('labour lookup: tenancy', () => {
  it('never returns another workshop’s operations, even for the same words', async () => {
    const other = await makeWorkshop(t.db, 'Search Elsewhere')
    const otherOwner = await signIn(t.app, other.owner.email)
    await addOperations(otherOwner, [
      {
        code: 'ELSEWHERE-UJ',
        name: 'Replace universal joint elsewhere',
        synonyms: ['UJ'],
        system: 'prop_shafts',
        side: 'none',
        bookHours: '1',
      },
    ])
    expect(codes(await search({ q: 'UJ' }))).not.toContain('ELSEWHERE-UJ')
    expect(codes(await search({ q: 'UJ' }, otherOwner))).toEqual(['ELSEWHERE-UJ'])
  })
})
