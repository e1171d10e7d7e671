/**
 * Turns what the technician recorded into a suggested severity and a plain description. The rules
 * are data in the check template; the thresholds in the starter template are common practice.
 */
import { compareTruncated, formatScaled, truncateScaled } from '../decimal'
import type { Severity } from '../schemas/severity'
import type { CheckDefinition, CentreDiffSteps, DiffOperationSteps, ResultValue } from '../schemas/inspections'

/** Readings are compared to a millionth; digits typed past that are dropped, never rounded up over a limit. */
const READING_PLACES = 6

const compareReadings = (a: string, b: string) => compareTruncated(a, b, READING_PLACES)

/** Degrees at the prop flange from a reading in degrees or in turns (1/8 turn = 45°). */
export function backlashDegrees(value: string, unit: 'degrees' | 'turn'): string {
  if (unit === 'degrees') return value
  return formatScaled(truncateScaled(value, READING_PLACES) * 360n, READING_PLACES)
}

export type Verdict = 'normal' | 'faulty'

/**
 * Differential operation test, vehicle on stands with both wheels free (common practice):
 * turning the prop turns both wheels the same way; holding the prop, one wheel drives the other the
 * opposite way; holding one wheel, turning the other turns the prop. A prop that turns both wheels at
 * the same speed and will not stop, or a wheel stiff to turn, means the differential unit is faulty.
 */
export function diffOperationVerdict(s: DiffOperationSteps): Verdict {
  const normal =
    s.propTurnsWheelsSameWay === 'yes' &&
    s.heldPropOtherWheelOpposite === 'yes' &&
    s.heldWheelPropTurns === 'yes' &&
    s.wheelStiff === 'no' &&
    s.propWontStop === 'no'
  return normal ? 'normal' : 'faulty'
}

/** Centre differential (common practice): unlocked, the outputs turn independently; locked, together; a large lag is excessive backlash. */
export function centreDiffVerdict(s: CentreDiffSteps): Verdict {
  return s.unlockedOutputsIndependent === 'yes' && s.lockedOutputsTogether === 'yes' && s.largeLagBetweenOutputs === 'no'
    ? 'normal'
    : 'faulty'
}

export interface Suggestion {
  /** null when nothing was measured (not checked). */
  severity: Severity | null
  detail: string
}

export class ResultMismatchError extends Error {}

export function suggestSeverity(check: CheckDefinition, value: ResultValue): Suggestion {
  const input = check.input
  if (value.kind === 'not-checked') return { severity: null, detail: `Not checked: ${value.reason}` }
  switch (input.kind) {
    case 'choice': {
      if (value.kind !== 'choice') break
      const option = input.options.find((o) => o.value === value.value)
      if (!option) throw new ResultMismatchError(`"${value.value}" is not one of the choices for ${check.code}`)
      return { severity: option.severity, detail: option.label }
    }
    case 'measurement': {
      if (value.kind !== 'measurement') break
      const bands = [...input.thresholds].sort((a, b) => compareReadings(b.above, a.above))
      const band = bands.find((t) => compareReadings(value.value, t.above) > 0)
      return { severity: band?.severity ?? 'ok', detail: `${value.value} ${input.unit}` }
    }
    case 'pass-fail': {
      if (value.kind !== 'pass-fail') break
      return { severity: value.passed ? 'ok' : input.failSeverity, detail: value.passed ? 'Passed' : 'Failed' }
    }
    case 'guided': {
      if (input.test === 'backlash' && value.kind === 'backlash') {
        const degrees = backlashDegrees(value.value, value.unit)
        const limit = input.limitDegrees ?? '45'
        const over = compareReadings(degrees, limit) > 0
        const reading = value.unit === 'turn' ? `${value.value} turn (${degrees}°)` : `${degrees}°`
        return { severity: over ? input.faultySeverity : 'ok', detail: `Free play ${reading} at the prop flange; limit ${limit}°` }
      }
      if (input.test === 'diff-operation' && value.kind === 'diff-operation') {
        const verdict = diffOperationVerdict(value.steps)
        return {
          severity: verdict === 'normal' ? 'ok' : input.faultySeverity,
          detail: verdict === 'normal' ? 'Differential works normally' : 'Differential unit faulty',
        }
      }
      if (input.test === 'centre-diff' && value.kind === 'centre-diff') {
        const verdict = centreDiffVerdict(value.steps)
        return {
          severity: verdict === 'normal' ? 'ok' : input.faultySeverity,
          detail:
            verdict === 'normal'
              ? 'Centre differential works normally'
              : value.steps.largeLagBetweenOutputs === 'yes'
                ? 'Excessive backlash between outputs'
                : 'Centre differential or its lock faulty',
        }
      }
      if (input.test === 'slider-orientation' && value.kind === 'slider-orientation') {
        return {
          severity: value.towardGearbox ? 'ok' : input.faultySeverity,
          detail: value.towardGearbox ? 'Slider toward the gearbox end' : 'Slider fitted the wrong way round',
        }
      }
      break
    }
  }
  throw new ResultMismatchError(`A ${value.kind} reading does not fit the check ${check.code}`)
}
