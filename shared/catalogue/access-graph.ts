/**
 * Access steps form a graph: a step may include others ("hub off" includes "wheel off"). A loop
 * would have no finite time, so loops are refused, named step by step.
 */
import { fromHundredths, toHundredths } from '../decimal'

export interface StepNode {
  code: string
  hours: string
  includes: readonly string[]
}

/** The first loop found, as codes from its first step back to it ("A → B → A"), or null. */
export function findLoop(steps: readonly StepNode[]): string[] | null {
  const byCode = new Map(steps.map((s) => [s.code, s]))
  const state = new Map<string, 'open' | 'done'>()
  const path: string[] = []

  const visit = (code: string): string[] | null => {
    const seen = state.get(code)
    if (seen === 'done') return null
    if (seen === 'open') return [...path.slice(path.indexOf(code)), code]
    state.set(code, 'open')
    path.push(code)
    for (const next of byCode.get(code)?.includes ?? []) {
      const loop = visit(next)
      if (loop) return loop
    }
    path.pop()
    state.set(code, 'done')
    return null
  }

  for (const step of [...steps].sort((a, b) => a.code.localeCompare(b.code))) {
    const loop = visit(step.code)
    if (loop) return loop
  }
  return null
}

/** Every step reached from `codes`, themselves included, each once. Assumes no loop. */
export function closureOf(codes: readonly string[], steps: ReadonlyMap<string, StepNode>): string[] {
  const found = new Set<string>()
  const stack = [...codes]
  while (stack.length > 0) {
    const code = stack.pop() as string
    if (found.has(code)) continue
    found.add(code)
    stack.push(...(steps.get(code)?.includes ?? []))
  }
  return [...found]
}

/** Time of the steps `codes` need, each step counted once however many paths lead to it. */
export function accessHours(codes: readonly string[], steps: ReadonlyMap<string, StepNode>): string {
  let total = 0
  for (const code of closureOf(codes, steps)) {
    const step = steps.get(code)
    if (step) total += toHundredths(step.hours)
  }
  return fromHundredths(total)
}
