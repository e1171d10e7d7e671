import { type PartInput, PartInputSchema } from '../../../shared/schemas/catalogue'
import { normalizeDecimal } from '../../../shared/decimal'
import { formatMajorUnits, parseMajorUnits } from '../../../shared/money'
import { unguardText } from './catalogue.csv'
import type { ImportTable } from './catalogue.import'

const optional = (v: string | undefined) => (v ?? '').trim()

/**
 * Parts as CSV. Money is written in major units ("12.50") as people type it in a spreadsheet; an
 * empty sell price means "from the markup bands", an empty tax rate the workshop's default, an
 * empty stock "not counted".
 */
export function partTable(exponent: number, defaultTaxRate: string): ImportTable<PartInput> {
  const money = (v: string | undefined) => parseMajorUnits(optional(v), exponent)
  const example = exponent > 0 ? `12.${'5'.padEnd(exponent, '0')}` : '1250'
  const moneyIssue = (column: string, what: string) => ({
    column,
    message: `Write the ${what} as a number like ${example}, without a currency sign or thousands separators.`,
  })
  return {
    columns: [
      { name: 'part_number', required: true },
      { name: 'description', required: true },
      { name: 'supplier_ref', required: false },
      { name: 'cost', required: true },
      { name: 'sell_price', required: false },
      { name: 'tax_rate', required: false },
      { name: 'stock_quantity', required: false },
    ],
    keyColumn: 'part_number',
    fieldColumns: {
      partNumber: 'part_number',
      description: 'description',
      supplierRef: 'supplier_ref',
      costMinor: 'cost',
      sellPriceMinor: 'sell_price',
      taxRate: 'tax_rate',
      stockQuantity: 'stock_quantity',
    },
    schema: PartInputSchema,
    cellIssues(c) {
      const issues: { column: string; message: string }[] = []
      if (money(c.cost) === null) issues.push(moneyIssue('cost', 'cost'))
      if (optional(c.sell_price) !== '' && money(c.sell_price) === null)
        issues.push(moneyIssue('sell_price', 'sell price, or leave it empty to use the markup bands,'))
      if (optional(c.stock_quantity) !== '' && !/^\d{1,7}$/.test(optional(c.stock_quantity))) {
        issues.push({
          column: 'stock_quantity',
          message: 'Write the stock as a whole number, or leave it empty if you do not count this part.',
        })
      }
      return issues
    },
    candidate: (c) => ({
      partNumber: unguardText(c.part_number ?? ''),
      description: unguardText(c.description ?? ''),
      supplierRef: unguardText(optional(c.supplier_ref)),
      costMinor: money(c.cost),
      sellPriceMinor: optional(c.sell_price) === '' ? null : money(c.sell_price),
      taxRate: optional(c.tax_rate) || defaultTaxRate,
      stockQuantity: optional(c.stock_quantity) === '' ? null : Number(c.stock_quantity),
    }),
    key: (i) => i.partNumber,
    cells: (i) => ({
      part_number: i.partNumber,
      description: i.description,
      supplier_ref: i.supplierRef ?? '',
      cost: formatMajorUnits(i.costMinor, exponent),
      sell_price: i.sellPriceMinor === null ? '' : formatMajorUnits(i.sellPriceMinor, exponent),
      tax_rate: normalizeDecimal(i.taxRate ?? defaultTaxRate),
      stock_quantity: i.stockQuantity === null ? '' : String(i.stockQuantity),
    }),
  }
}

/** Invented example row for the downloadable template; the dialog says to replace it. */
export function partTemplateRow(exponent: number): Record<string, string> {
  return {
    part_number: 'EXAMPLE-1001',
    description: 'Example: prop shaft universal joint',
    supplier_ref: 'SUP-0001',
    cost: formatMajorUnits(1840, exponent),
    sell_price: '',
    tax_rate: '20',
    stock_quantity: '4',
  }
}
