/** Small builders so test tables read like estimates rather than JSON. */
import type { EstimateInput, EstimateItem, EstimateLine } from '../../shared/estimate/contract'

export function labour(hours: string, rate: number, taxRate = '20', accessSteps: string[] = [], description = 'Labour'): EstimateLine {
  return { kind: 'labour', description, hours, rate, taxRate, accessSteps }
}

export function part(quantity: string, unitPrice: number, taxRate = '20', description = 'Part'): EstimateLine {
  return { kind: 'part', description, quantity, unitPrice, taxRate }
}

export function fee(amount: number, taxRate = '20', description = 'Fee'): EstimateLine {
  return { kind: 'fee', description, amount, taxRate }
}

export function item(
  id: string,
  decision: EstimateItem['decision'],
  lines: EstimateLine[],
  requires: string[] = [],
  title = `Item ${id}`,
): EstimateItem {
  return { id, title, decision, requires, lines }
}

export function estimate(overrides: Partial<EstimateInput> & Pick<EstimateInput, 'items'>): EstimateInput {
  return {
    currency: 'GBP',
    taxMode: 'exclusive',
    taxRounding: 'per-line',
    accessSteps: [],
    discount: null,
    deposit: { kind: 'none' },
    ...overrides,
  }
}
