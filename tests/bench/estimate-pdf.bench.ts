/**
 * How long the estimate PDF takes to render, from the engine's result to the saved bytes
 * (fonts embedded and subset every time; the font files are read once per process).
 * Target: a 100-line estimate (25 items of 4 lines) in under 300 ms (median).
 */
import { renderEstimatePdf } from '../../server/modules/estimates/estimate-pdf'
import { calculateEstimate } from '../../shared/estimate'
import { snapshotToEngineInput, type EstimateSnapshot } from '../../shared/schemas/estimates'
import { formatMs, measure } from './stats'

const severities = ['urgent', 'soon', 'watch', 'ok'] as const

/** A deterministic, invented sent estimate: `itemCount` items of four lines, every fourth sharing the hub-off step. */
export function benchSnapshot(itemCount: number): EstimateSnapshot {
  return {
    format: 1,
    estimateId: '00000000-0000-4000-8000-000000000001',
    number: 42,
    reference: 'E-0042',
    version: 2,
    expiresOn: '2026-12-16',
    currency: 'GBP',
    workshop: {
      name: 'Ridgeway Four by Four',
      addressLines: ['Unit 4, Quarry Lane Trading Estate', 'Little Hadley'],
      postcode: 'HD9 4QX',
      phone: '01632 960123',
      email: 'desk@ridgeway4x4.example',
      vatNumber: 'GB123456789',
    },
    customer: { id: '00000000-0000-4000-8000-000000000002', name: 'Alex Demo-Customer', email: 'alex@example.com' },
    vehicle: { registration: 'AB12 CDE', make: 'Land Rover', model: 'Defender 110', year: 2012, vin: 'SALLDHMF7CA000001' },
    message:
      'Thanks for bringing the vehicle in. We found a few things on the ramp; the urgent ones are first. Call us with any questions before you decide.',
    items: Array.from({ length: itemCount }, (_, i) => ({
      id: `item-${i + 1}`,
      number: i + 1,
      title: `Replace worn drivetrain part, finding ${i + 1}`,
      severity: severities[i % severities.length]!,
      customerNote:
        i % 2 === 0
          ? 'The seal is weeping onto the brake disc and the lubricant is low; left as it is, water and dirt get in and the bearing wears quickly.'
          : '',
      explanation: null,
      measurement: i % 3 === 0 ? `Play ${(i % 9) + 1} mm at the flange` : null,
      photoIds: [],
      requires: [],
      lines: [
        {
          kind: 'labour' as const,
          id: `a${i}`,
          description: 'Strip hub and replace the joint',
          hours: '2.6',
          rate: 8950,
          taxRate: '20',
          accessSteps: i % 4 === 0 ? ['hub-off'] : [],
          operationCode: null,
          category: null,
        },
        {
          kind: 'part' as const,
          id: `b${i}`,
          description: `Joint kit ${1000 + i}`,
          quantity: '1',
          unitPrice: 11999 + i * 13,
          taxRate: '20',
          partNumber: null,
        },
        {
          kind: 'part' as const,
          id: `c${i}`,
          description: 'Gear oil, litres',
          quantity: '2.5',
          unitPrice: 1199,
          taxRate: '20',
          partNumber: null,
        },
        { kind: 'fee' as const, id: `d${i}`, description: 'Waste disposal', amount: 350, taxRate: '0' },
      ],
    })),
    accessSteps: [{ code: 'hub-off', hours: '1.2', includes: [], label: 'hub off' }],
    taxMode: 'exclusive',
    taxRounding: 'per-line',
    discount: null,
    deposit: { kind: 'percent', value: '25' },
  }
}

/** Mean CPU time of this process per call; unlike wall time it does not grow while other work holds the cores. */
async function cpuMsPerRun(fn: () => Promise<unknown>, runs: number): Promise<number> {
  const start = process.cpuUsage()
  for (let i = 0; i < runs; i++) await fn()
  const used = process.cpuUsage(start)
  return (used.user + used.system) / 1000 / runs
}

export default async function () {
  const snapshot = benchSnapshot(25)
  const result = calculateEstimate(snapshotToEngineInput(snapshot))
  const render = () =>
    renderEstimatePdf({ snapshot, result, sentAt: '2026-12-02T10:15:00Z', timezone: 'Europe/London', hash: 'ab'.repeat(32) })
  const firstStart = process.hrtime.bigint()
  const bytes = await render()
  const first = Number(process.hrtime.bigint() - firstStart) / 1e6
  const times = await measure(render, 40, 5)
  const cpu = await cpuMsPerRun(render, 20)
  console.log(
    `100 lines (25 items × 4), ${bytes.length.toLocaleString('en-GB')} bytes: median ${formatMs(times.median)}, p95 ${formatMs(times.p95)}, min ${formatMs(times.min)}; mean CPU ${formatMs(cpu)} (target: median < 300 ms)`,
  )
  console.log(`first render in the process (reads and unpacks the fonts): ${formatMs(first)}`)
}
