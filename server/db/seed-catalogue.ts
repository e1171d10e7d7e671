/**
 * Demo data for the labour-time table and parts catalogue. Every code, name, book time, price,
 * rate, markup, stock figure and clock time in this file is invented for the demo: none is taken
 * from any published labour-time guide or price list, and none may be used as a truth in tests.
 */
import * as schema from './schema'
import type { Tx } from './client'
import type { LabourCategory, LabourSide, LabourSystem } from '../../shared/schemas/catalogue'

const COIL = 'coil-sprung-live-axle'
const LEAF = 'leaf-sprung-pickup'

/** [code, name, own hours, includes] */
const steps: [string, string, string, string[]][] = [
  ['WHL-FL', 'Front left wheel off and on', '0.2', []],
  ['WHL-FR', 'Front right wheel off and on', '0.2', []],
  ['WHL-RL', 'Rear left wheel off and on', '0.2', []],
  ['WHL-RR', 'Rear right wheel off and on', '0.2', []],
  ['CAL-FL', 'Front left brake caliper off and tied up', '0.3', ['WHL-FL']],
  ['CAL-FR', 'Front right brake caliper off and tied up', '0.3', ['WHL-FR']],
  ['HUB-FL', 'Front left hub off and on', '0.8', ['CAL-FL']],
  ['HUB-FR', 'Front right hub off and on', '0.8', ['CAL-FR']],
  ['SWV-FL', 'Front left swivel housing stripped and rebuilt', '1', ['HUB-FL']],
  ['SWV-FR', 'Front right swivel housing stripped and rebuilt', '1', ['HUB-FR']],
  ['HSH-RL', 'Rear left half shaft out and in', '0.5', ['WHL-RL']],
  ['HSH-RR', 'Rear right half shaft out and in', '0.5', ['WHL-RR']],
  ['PROP-F', 'Front prop shaft off and on', '0.4', []],
  ['PROP-R', 'Rear prop shaft off and on', '0.4', []],
  ['DRN-F', 'Front axle oil drained and refilled', '0.3', []],
  ['DRN-R', 'Rear axle oil drained and refilled', '0.3', []],
  ['TB-OUT', 'Transfer box out and in', '3', ['PROP-F', 'PROP-R']],
  ['GUARD', 'Steering guard off and on', '0.3', []],
]

interface DemoOperation {
  code: string
  name: string
  synonyms: string[]
  system: LabourSystem
  groups: string[]
  side: LabourSide
  hours: string
  category: LabourCategory
  steps: string[]
  notes?: string
}

const op = (
  code: string,
  name: string,
  synonyms: string[],
  system: LabourSystem,
  groups: string[],
  side: LabourSide,
  hours: string,
  category: LabourCategory,
  opSteps: string[],
  notes?: string,
): DemoOperation => ({
  code,
  name,
  synonyms,
  system,
  groups,
  side,
  hours,
  category,
  steps: opSteps,
  notes,
})

/** A left and a right operation from one description; sided access steps end in L or R. */
const pair = (
  code: string,
  name: string,
  synonyms: string[],
  system: LabourSystem,
  groups: string[],
  hours: string,
  category: LabourCategory,
  opSteps: string[],
): DemoOperation[] =>
  (['L', 'R'] as const).map((s) =>
    op(
      `${code}-${s}`,
      `${name}, ${s === 'L' ? 'left' : 'right'}`,
      synonyms,
      system,
      groups,
      s === 'L' ? 'left' : 'right',
      hours,
      category,
      opSteps.map((x) => x.replace(/[LR]$/, s)),
    ),
  )

const operations: DemoOperation[] = [
  ...pair('SWV-SEAL', 'Replace swivel housing oil seal', ['swivel seal', 'swivel ball seal'], 'front_axle', [COIL], '3.2', 'standard', [
    'HUB-FL',
  ]),
  ...pair('SWV-BRG', 'Replace swivel pin bearings', ['kingpin bearings', 'swivel bearings'], 'front_axle', [COIL], '4.5', 'standard', [
    'SWV-FL',
  ]),
  ...pair('SWV-BALL', 'Replace swivel ball', ['swivel housing ball', 'chrome ball'], 'front_axle', [COIL], '5.8', 'specialist', ['SWV-FL']),
  ...pair('CV-REPLACE', 'Replace CV joint', ['constant velocity joint', 'CVJ'], 'front_axle', [COIL], '3.6', 'standard', ['HUB-FL']),
  ...pair('CV-BOOT', 'Replace CV joint boot', ['CV gaiter', 'boot kit'], 'front_axle', [COIL], '2.4', 'standard', ['HUB-FL']),
  ...pair('HALF-SHAFT', 'Replace front half shaft', ['axle shaft', 'driveshaft'], 'front_axle', [], '2.8', 'standard', ['HUB-FL']),
  ...pair(
    'FA-111',
    'Clean out and refill swivel housing with grease',
    ['swivel grease', 'swivel oil to grease'],
    'front_axle',
    [COIL],
    '1.2',
    'standard',
    [],
  ),
  op(
    'DIFF-OVERHAUL-F',
    'Overhaul front differential',
    ['diff rebuild', 'front diff overhaul'],
    'front_axle',
    [],
    'none',
    '6.5',
    'specialist',
    ['PROP-F', 'DRN-F'],
  ),
  op('DIFF-REPLACE-F', 'Replace front differential unit', ['diff swap', 'exchange diff'], 'front_axle', [], 'none', '3.4', 'standard', [
    'PROP-F',
    'DRN-F',
  ]),
  op(
    'DIFF-PINION-SEAL-F',
    'Replace front pinion oil seal',
    ['pinion seal', 'front diff seal'],
    'front_axle',
    [],
    'none',
    '1.6',
    'standard',
    ['PROP-F'],
  ),
  op(
    'FA-108',
    'Change front axle oil and check the drain plug for metal',
    ['front diff oil change', 'axle oil'],
    'front_axle',
    [],
    'none',
    '0.6',
    'standard',
    ['DRN-F'],
  ),
  op(
    'FA-109',
    'Set front differential backlash and bearing preload',
    ['diff setup', 'backlash adjustment'],
    'front_axle',
    [],
    'none',
    '3.5',
    'specialist',
    ['PROP-F', 'DRN-F'],
  ),
  op(
    'FA-110',
    'Front differential operation test, wheels free',
    ['diff test', 'diff check'],
    'front_axle',
    [],
    'none',
    '0.5',
    'diagnostic',
    [],
    'Vehicle on stands; see the inspection guide for the three-turn test.',
  ),
  op('FA-112', 'Replace front axle breather pipe', ['axle breather'], 'front_axle', [], 'none', '0.4', 'standard', []),
  ...pair('RA-201', 'Replace rear half shaft', ['axle shaft', 'halfshaft'], 'rear_axle', [], '1.4', 'standard', ['HSH-RL']),
  ...pair('RA-202', 'Replace rear hub oil seal', ['hub seal', 'rear hub seal'], 'rear_axle', [], '1.9', 'standard', ['HSH-RL']),
  op('DIFF-OVERHAUL-R', 'Overhaul rear differential', ['diff rebuild', 'rear diff overhaul'], 'rear_axle', [], 'none', '6', 'specialist', [
    'PROP-R',
    'DRN-R',
  ]),
  op('DIFF-REPLACE-R', 'Replace rear differential unit', ['diff swap', 'exchange diff'], 'rear_axle', [], 'none', '3.2', 'standard', [
    'PROP-R',
    'DRN-R',
  ]),
  op('DIFF-PINION-SEAL-R', 'Replace rear pinion oil seal', ['pinion seal', 'rear diff seal'], 'rear_axle', [], 'none', '1.5', 'standard', [
    'PROP-R',
  ]),
  op('RA-205', 'Change rear axle oil', ['rear diff oil change', 'axle oil'], 'rear_axle', [], 'none', '0.6', 'standard', ['DRN-R']),
  op('RA-206', 'Fit rear differential lock actuator', ['diff lock', 'locker'], 'rear_axle', [], 'none', '2.4', 'specialist', ['DRN-R']),
  op(
    'RA-207',
    'Rear differential operation test, wheels free',
    ['diff test', 'diff check'],
    'rear_axle',
    [],
    'none',
    '0.5',
    'diagnostic',
    [],
  ),
  op('RA-208', 'Replace rear axle U-bolts and spring pads', ['U bolts', 'spring pads'], 'rear_axle', [LEAF], 'both', '1.8', 'standard', []),
  op('RA-209', 'Replace rear axle breather pipe', ['axle breather'], 'rear_axle', [], 'none', '0.3', 'standard', []),
  op(
    'PROP-UJ-F',
    'Replace front prop shaft universal joint',
    ['UJ', 'cross and bearing', 'front UJ'],
    'prop_shafts',
    [],
    'none',
    '1.6',
    'standard',
    ['PROP-F'],
  ),
  op(
    'PROP-UJ-R',
    'Replace both rear prop shaft universal joints',
    ['UJ', 'cross and bearing', 'rear UJs'],
    'prop_shafts',
    [],
    'none',
    '2.2',
    'standard',
    ['PROP-R'],
  ),
  op(
    'PS-303',
    'Replace rear prop shaft centre bearing',
    ['centre support bearing', 'carrier bearing'],
    'prop_shafts',
    [LEAF],
    'none',
    '1.8',
    'standard',
    ['PROP-R'],
  ),
  op(
    'PROP-REFIT',
    'Refit prop shaft sliding joint toward the gearbox',
    ['slider', 'sliding joint', 'spline phasing'],
    'prop_shafts',
    [],
    'none',
    '0.9',
    'standard',
    ['PROP-F'],
  ),
  op('PS-305', 'Grease prop shaft joints and splines', ['prop grease'], 'prop_shafts', [], 'none', '0.4', 'standard', []),
  op('PROP-REPLACE-F', 'Replace front prop shaft complete', ['propshaft', 'front prop'], 'prop_shafts', [], 'none', '0.8', 'standard', [
    'PROP-F',
  ]),
  op('PROP-REPLACE-R', 'Replace rear prop shaft complete', ['propshaft', 'rear prop'], 'prop_shafts', [], 'none', '0.8', 'standard', [
    'PROP-R',
  ]),
  op(
    'PROP-BALANCE',
    'Trace prop shaft vibration and check balance',
    ['prop vibration', 'driveline vibration'],
    'prop_shafts',
    [],
    'none',
    '1',
    'diagnostic',
    [],
  ),
  op('PROP-FLANGE', 'Replace prop shaft flange bolts and nuts', ['flange bolts'], 'prop_shafts', [], 'none', '0.5', 'standard', []),
  op(
    'TBOX-OUTPUT-BRG',
    'Replace transfer box rear output shaft bearing',
    ['output bearing', 'rear output'],
    'transfer_box',
    [],
    'none',
    '5.2',
    'specialist',
    ['TB-OUT'],
  ),
  op(
    'TB-402',
    'Replace transfer box front output oil seal',
    ['output seal', 'front output seal'],
    'transfer_box',
    [],
    'none',
    '1.1',
    'standard',
    ['PROP-F'],
  ),
  op(
    'TB-403',
    'Replace transfer box rear output oil seal',
    ['output seal', 'rear output seal'],
    'transfer_box',
    [],
    'none',
    '1.1',
    'standard',
    ['PROP-R'],
  ),
  op(
    'TBOX-CDIFF',
    'Repair centre differential lock mechanism',
    ['diff lock', 'centre diff lock', 'CDL'],
    'transfer_box',
    [COIL],
    'none',
    '3.8',
    'specialist',
    [],
  ),
  op('TB-405', 'Overhaul transfer box', ['transfer case rebuild', 't-box overhaul'], 'transfer_box', [], 'none', '12', 'specialist', [
    'TB-OUT',
  ]),
  op(
    'TB-406',
    'Check backlash between transfer box outputs',
    ['output backlash', 'knock on take-up'],
    'transfer_box',
    [],
    'none',
    '0.6',
    'diagnostic',
    [],
  ),
  op('TB-407', 'Change transfer box oil', ['t-box oil change'], 'transfer_box', [], 'none', '0.5', 'standard', []),
  op(
    'TB-408',
    'Replace high and low range selector linkage bushes',
    ['range selector', 'hi-lo linkage'],
    'transfer_box',
    [],
    'none',
    '1.3',
    'standard',
    [],
  ),
  ...pair('ST-501', 'Replace track rod end', ['TRE', 'tie rod end'], 'steering', [], '0.8', 'standard', []),
  op('ST-502', 'Replace drag link', ['relay rod'], 'steering', [COIL], 'none', '1', 'standard', ['GUARD']),
  op('ST-503', 'Replace steering damper', ['damper', 'steering shock'], 'steering', [], 'none', '0.5', 'standard', []),
  op('ST-504', 'Replace panhard rod bushes', ['panhard', 'track bar bushes'], 'steering', [COIL], 'none', '1.2', 'standard', []),
  op(
    'ST-505',
    'Adjust steering box and check free play',
    ['steering box adjustment', 'free play'],
    'steering',
    [],
    'none',
    '0.8',
    'diagnostic',
    [],
  ),
  op('ST-506', 'Replace steering box', ['steering gear'], 'steering', [], 'none', '3', 'specialist', ['GUARD']),
  op('ST-507', 'Check wheel alignment on live axles', ['tracking', 'toe-in'], 'steering', [], 'none', '0.9', 'standard', []),
  ...pair('HUB-BRG', 'Replace front wheel bearings', ['hub bearing', 'wheel bearing'], 'hubs_bearings', [], '2.1', 'standard', ['HUB-FL']),
  ...pair('HB-602', 'Replace rear wheel bearings', ['hub bearing', 'wheel bearing'], 'hubs_bearings', [], '2', 'standard', ['HSH-RL']),
  ...pair('HB-603', 'Adjust front wheel bearing preload', ['bearing play', 'hub adjustment'], 'hubs_bearings', [], '1.6', 'standard', [
    'HUB-FL',
  ]),
  op('HB-604', 'Fit a pair of free-wheeling hubs', ['freewheel hubs', 'locking hubs'], 'hubs_bearings', [LEAF], 'both', '1.7', 'standard', [
    'WHL-FL',
    'WHL-FR',
  ]),
  op('HB-605', 'Check hub bearing play on all four wheels', ['bearing check'], 'hubs_bearings', [], 'none', '0.7', 'diagnostic', []),
]

/**
 * [description, cost in pence, code]; each becomes a part for each demo vehicle group. A part with a
 * code is numbered `<code>-C`/`<code>-L`, so the starter check template's suggested parts find it.
 */
const partLines: [string, number, string?][] = [
  ['Universal joint, standard series', 1840, 'UJ-STD'],
  ['Universal joint, heavy series', 2650, 'UJ-HD'],
  ['Swivel housing oil seal kit', 2200, 'SWV-SEAL-KIT'],
  ['Swivel pin bearing kit', 4800, 'SWV-BRG-KIT'],
  ['Swivel ball, chrome', 9600, 'SWV-BALL'],
  ['Swivel housing gasket set', 650],
  ['CV joint, outer', 8900, 'CV-JOINT'],
  ['CV joint boot kit', 1450, 'CV-BOOT-KIT'],
  ['Front half shaft', 12400, 'HALF-SHAFT'],
  ['Rear half shaft', 11800],
  ['Front hub oil seal', 480],
  ['Rear hub oil seal', 520],
  ['Front wheel bearing set', 3600, 'HUB-BRG-KIT'],
  ['Rear wheel bearing set', 3400],
  ['Hub nut and lock washer kit', 750],
  ['Differential pinion oil seal', 690, 'PINION-SEAL'],
  ['Differential bearing kit', 8200, 'DIFF-BRG-KIT'],
  ['Crown wheel and pinion set', 38500],
  ['Differential planet gear kit', 14200],
  ['Differential unit, exchange', 41500, 'DIFF-UNIT'],
  ['Differential cover gasket', 310],
  ['Axle breather pipe and valve', 420],
  ['Axle oil, 1 litre', 890, 'OIL-EP90-1L'],
  ['Transfer box output bearing', 2900, 'TBOX-BRG-KIT'],
  ['Transfer box output oil seal', 760],
  ['Centre differential lock switch', 3100],
  ['Centre differential unit, exchange', 36800, 'CDIFF-UNIT'],
  ['Transfer box gasket set', 1900],
  ['Transfer box oil, 1 litre', 940],
  ['Range selector bush kit', 560],
  ['Prop shaft centre bearing', 4100],
  ['Prop shaft flange bolt kit', 380, 'PROP-BOLT-SET'],
  ['Prop shaft sliding joint gaiter', 990],
  ['Prop shaft, front, complete', 21500, 'PROP-SHAFT'],
  ['Prop shaft, rear, complete', 24800],
  ['Track rod end', 1650],
  ['Drag link', 6200],
  ['Steering damper', 3300],
  ['Panhard rod bush set', 1700],
  ['Steering box seal kit', 2400],
  ['U-bolt and spring pad kit', 4300],
  ['Free-wheeling hub pair', 18900],
  ['Grease, lithium, 400 g cartridge', 560],
  ['Swivel housing grease sachet', 420],
  ['Split pin assortment', 240],
  ['Thread locking compound', 820],
  ['Anti-seize paste', 690],
  ['Brake caliper bolt kit', 540],
  ['Axle drain and fill plug set', 460],
  ['Oil seal, general, 45 mm', 350],
  ['Oil seal, general, 60 mm', 410],
  ['Gasket sealant, oil resistant', 780],
]

/** Invented demo pricing: hourly rates in pence, markup bands from cost in pence. */
const demoPricing = { standardRateMinor: 8500, diagnosticRateMinor: 9500, specialistRateMinor: 11000, defaultTaxRate: '20' }
const demoBands = [
  { fromCostMinor: 0, markupPercent: '60' },
  { fromCostMinor: 1000, markupPercent: '45' },
  { fromCostMinor: 5000, markupPercent: '35' },
  { fromCostMinor: 20000, markupPercent: '25' },
]

/** Invented clock times (hours) so the time comparison has something to show. */
const demoClockTimes: Record<string, string[]> = {
  'SWV-SEAL-L': ['3.5', '2.9', '3.8', '3.3'],
  'CV-REPLACE-R': ['4.1', '3.9', '4.4'],
  'PROP-UJ-F': ['1.2', '1.4', '1.1', '1.5', '1.3'],
  'DIFF-PINION-SEAL-R': ['1.5', '1.7'],
  'HUB-BRG-L': ['2.4', '2.2', '2.6'],
  'TBOX-CDIFF': ['4.5', '3.9', '5.1'],
}

/** Seeds one workshop's demo labour times, access steps, parts and pricing. All figures are invented demo data. */
export async function seedCatalogue(tx: Tx, workshopId: string, opts: { technicianId?: string } = {}): Promise<void> {
  const savedSteps = await tx
    .insert(schema.accessSteps)
    .values(steps.map(([code, name, hours]) => ({ workshopId, code, name, hours })))
    .returning()
  const stepId = new Map(savedSteps.map((s) => [s.code, s.id]))
  const idOf = (code: string) => {
    const id = stepId.get(code)
    if (!id) throw new Error(`demo access step ${code} is missing`)
    return id
  }
  await tx
    .insert(schema.accessStepIncludes)
    .values(steps.flatMap(([code, , , includes]) => includes.map((inc) => ({ workshopId, stepId: idOf(code), includedStepId: idOf(inc) }))))

  const savedOps = await tx
    .insert(schema.labourOperations)
    .values(
      operations.map((o) => ({
        workshopId,
        code: o.code,
        name: o.name,
        synonyms: o.synonyms,
        system: o.system,
        vehicleGroups: o.groups,
        side: o.side,
        bookHours: o.hours,
        category: o.category,
        notes: o.notes ?? null,
      })),
    )
    .returning()
  const opId = new Map(savedOps.map((o) => [o.code, o.id]))
  await tx
    .insert(schema.labourOperationAccessSteps)
    .values(
      operations.flatMap((o) =>
        o.steps.map((code, position) => ({ workshopId, operationId: opId.get(o.code) ?? '', accessStepId: idOf(code), position })),
      ),
    )

  const groups = [
    { suffix: 'C', label: 'coil-sprung axle', factor: 100 },
    { suffix: 'L', label: 'leaf-sprung pickup', factor: 112 },
  ]
  await tx.insert(schema.parts).values(
    partLines.flatMap(([description, cost, code], i) =>
      groups.map((g, k) => ({
        workshopId,
        partNumber: code ? `${code}-${g.suffix}` : `TK-${String(1001 + i).padStart(4, '0')}-${g.suffix}`,
        description: `${description}, for ${g.label}`,
        supplierRef: `SUP-${String(40000 + i * 7 + k).padStart(5, '0')}`,
        costMinor: Math.round((cost * g.factor) / 100),
        // Every seventh part has a fixed price, to show both kinds side by side.
        sellPriceMinor: i % 7 === 3 ? Math.round((cost * g.factor * 2) / 100) : null,
        taxRate: '20',
        stockQuantity: i % 4 === 0 ? null : (i * 3 + k) % 9,
      })),
    ),
  )

  await tx.insert(schema.workshopPricing).values({ workshopId, ...demoPricing })
  await tx.insert(schema.markupBands).values(demoBands.map((b) => ({ workshopId, ...b })))

  if (opts.technicianId) {
    const technicianId = opts.technicianId
    await tx
      .insert(schema.labourClockTimes)
      .values(
        Object.entries(demoClockTimes).flatMap(([code, times]) =>
          times.map((hours) => ({ workshopId, operationId: opId.get(code) ?? '', technicianId, hours })),
        ),
      )
  }
}

export const demoCatalogueSize = { operations: operations.length, accessSteps: steps.length, parts: partLines.length * 2 }
