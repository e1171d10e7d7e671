/**
 * How long the estimate engine takes, from untyped input (zod parse included) to the result.
 * Target: a 1,000-line estimate with 50 shared access steps in under 5 ms (median).
 */
import { calculateEstimate } from '../../shared/estimate'
import type { EstimateInputDraft } from '../../shared/estimate/contract'
import { formatMs, measure } from './stats'

/** A deterministic, invented estimate: `itemCount` items of five lines each, half of them labour sharing access steps. */
export function benchEstimate(itemCount: number, stepCount: number): EstimateInputDraft {
  const steps = Array.from({ length: stepCount }, (_, s) => ({
    code: `step-${s}`,
    hours: `0.${(s % 9) + 1}`,
    // Every fifth step sits on top of the two before it, so closures are a few steps deep.
    includes: s % 5 === 4 ? [`step-${s - 1}`, `step-${s - 2}`] : [],
  }))
  const decisions = ['approved', 'approved', 'pending', 'declined'] as const
  return {
    currency: 'GBP',
    taxMode: 'exclusive',
    taxRounding: 'per-invoice',
    accessSteps: steps,
    items: Array.from({ length: itemCount }, (_, i) => ({
      id: `item-${i}`,
      title: `Item ${i}`,
      decision: decisions[i % decisions.length]!,
      lines: [
        {
          kind: 'labour',
          description: 'Main job',
          hours: '4.5',
          rate: 8500,
          taxRate: '20',
          accessSteps: [`step-${(i * 7) % stepCount}`, `step-${(i * 3 + 4) % stepCount}`],
        },
        {
          kind: 'labour',
          description: 'Second job',
          hours: '3.25',
          rate: 9250,
          taxRate: '20',
          accessSteps: [`step-${(i * 11 + 9) % stepCount}`],
        },
        { kind: 'part', description: 'Kit', quantity: '1', unitPrice: 14999, taxRate: '20' },
        { kind: 'part', description: 'Oil', quantity: '2.5', unitPrice: 1199, taxRate: '20' },
        { kind: 'fee', description: 'Disposal', amount: 350, taxRate: '0' },
      ],
    })),
    discount: { kind: 'percent', value: '7.5' },
    deposit: { kind: 'parts' },
  }
}

/**
 * Mean CPU time of this process per call, all threads (so V8's background GC work counts too).
 * Unlike wall time it does not grow while the call waits for a core that other work is using.
 */
function cpuMsPerRun(fn: () => unknown, runs: number): number {
  const start = process.cpuUsage()
  for (let i = 0; i < runs; i++) fn()
  const used = process.cpuUsage(start)
  return (used.user + used.system) / 1000 / runs
}

export default async function () {
  const large = benchEstimate(200, 50)
  const small = benchEstimate(4, 50)
  const largeTimes = await measure(() => calculateEstimate(large), 200, 30)
  const smallTimes = await measure(() => calculateEstimate(small), 2000, 200)
  const largeCpu = cpuMsPerRun(() => calculateEstimate(large), 200)
  const smallCpu = cpuMsPerRun(() => calculateEstimate(small), 2000)
  console.log(
    `1,000 lines, 50 access steps: median ${formatMs(largeTimes.median)}, p95 ${formatMs(largeTimes.p95)}, min ${formatMs(largeTimes.min)}; mean CPU ${formatMs(largeCpu)} (target: median < 5 ms)`,
  )
  console.log(
    `20 lines, 50 access steps:    median ${formatMs(smallTimes.median)}, p95 ${formatMs(smallTimes.p95)}, min ${formatMs(smallTimes.min)}; mean CPU ${formatMs(smallCpu)}`,
  )
}
