import {
  type AccessStepInput,
  AccessStepInputSchema,
  type LabourOperationInput,
  LabourOperationInputSchema,
  labourCategories,
  labourCategoryLabels,
  labourSides,
  labourSideLabels,
  labourSystems,
  labourSystemLabels,
} from '../../../shared/schemas/catalogue'
import { normalizeDecimal } from '../../../shared/decimal'
import { joinList, splitList, unguardText } from './catalogue.csv'
import type { ImportTable } from './catalogue.import'

/** Accepts a code ("front_axle") or its label ("Front axle"), in any case. */
function enumCell<const C extends string>(cell: string | undefined, codes: readonly C[], labels: Record<C, string>): string {
  const v = (cell ?? '').trim().toLowerCase()
  return codes.find((c) => c === v || labels[c].toLowerCase() === v) ?? v
}

const decimalCell = (v: string | undefined) => {
  const text = (v ?? '').trim()
  try {
    return normalizeDecimal(text)
  } catch {
    return text
  }
}

const codes = (cell: string | undefined) => splitList(cell ?? '').map((c) => c.toUpperCase())

export const operationTable: ImportTable<LabourOperationInput> = {
  columns: [
    { name: 'code', required: true },
    { name: 'name', required: true },
    { name: 'synonyms', required: false },
    { name: 'system', required: true },
    { name: 'vehicle_groups', required: false },
    { name: 'side', required: true },
    { name: 'book_hours', required: true },
    { name: 'category', required: true },
    { name: 'access_steps', required: false },
    { name: 'notes', required: false },
  ],
  keyColumn: 'code',
  fieldColumns: {
    code: 'code',
    name: 'name',
    synonyms: 'synonyms',
    system: 'system',
    vehicleGroups: 'vehicle_groups',
    side: 'side',
    bookHours: 'book_hours',
    category: 'category',
    accessSteps: 'access_steps',
    notes: 'notes',
  },
  schema: LabourOperationInputSchema,
  candidate: (c) => ({
    code: c.code ?? '',
    name: unguardText(c.name ?? ''),
    synonyms: splitList(unguardText(c.synonyms ?? '')),
    system: enumCell(c.system, labourSystems, labourSystemLabels),
    vehicleGroups: splitList(unguardText(c.vehicle_groups ?? '')),
    side: enumCell(c.side, labourSides, labourSideLabels),
    bookHours: c.book_hours ?? '',
    category: enumCell(c.category, labourCategories, labourCategoryLabels),
    accessSteps: codes(c.access_steps),
    notes: unguardText(c.notes ?? ''),
  }),
  key: (i) => i.code,
  cells: (i) => ({
    code: i.code,
    name: i.name,
    synonyms: joinList(i.synonyms),
    system: i.system,
    vehicle_groups: joinList(i.vehicleGroups),
    side: i.side,
    book_hours: decimalCell(i.bookHours),
    category: i.category,
    access_steps: joinList(i.accessSteps),
    notes: i.notes ?? '',
  }),
}

export const stepTable: ImportTable<AccessStepInput> = {
  columns: [
    { name: 'code', required: true },
    { name: 'name', required: true },
    { name: 'hours', required: true },
    { name: 'includes', required: false },
  ],
  keyColumn: 'code',
  fieldColumns: { code: 'code', name: 'name', hours: 'hours', includes: 'includes' },
  schema: AccessStepInputSchema,
  candidate: (c) => ({ code: c.code ?? '', name: unguardText(c.name ?? ''), hours: c.hours ?? '', includes: codes(c.includes) }),
  key: (i) => i.code,
  // Includes are a set: the order they are listed in does not change the step.
  cells: (i) => ({ code: i.code, name: i.name, hours: decimalCell(i.hours), includes: joinList([...i.includes].sort()) }),
}

/** Invented example rows for the downloadable templates; the dialog says to replace them. */
export const operationTemplateRow: Record<string, string> = {
  code: 'EXAMPLE-01',
  name: 'Example: replace front hub bearing',
  synonyms: 'wheel bearing|hub bearing',
  system: 'hubs_bearings',
  vehicle_groups: 'coil-sprung-live-axle',
  side: 'left',
  book_hours: '2.5',
  category: 'standard',
  access_steps: '',
  notes: 'Replace this example row with your own operations.',
}

export const stepTemplateRow: Record<string, string> = {
  code: 'EXAMPLE-WHEEL',
  name: 'Example: wheel off and on',
  hours: '0.3',
  includes: '',
}
