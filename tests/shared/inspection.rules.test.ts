import { describe, expect, it } from 'vitest'
import { backlashDegrees, centreDiffVerdict, diffOperationVerdict, suggestSeverity } from '../../shared/inspection/rules'
import { assessStands } from '../../shared/inspection/stands'
import { starterChecks } from '../../shared/inspection/starter-template'
import {
  SafetyCheckSchema,
  TemplateDefinitionSchema,
  type CheckDefinition,
  type DiffOperationSteps,
} from '../../shared/schemas/inspections'

const check = (code: string): CheckDefinition => {
  const found = starterChecks.find((c) => c.code === code)
  if (!found) throw new Error(`no check ${code}`)
  return found
}

describe('backlash at the prop flange', () => {
  // A whole turn is 360°, so 1/8 turn is 45° (geometry). The 45° limit itself is common practice.
  it.each([
    ['0.125', 'turn', '45'],
    ['0.25', 'turn', '90'],
    ['0.0625', 'turn', '22.5'],
    ['30', 'degrees', '30'],
  ] as const)('%s %s is %s°', (value, unit, degrees) => {
    expect(backlashDegrees(value, unit)).toBe(degrees)
  })

  it.each([
    // [reading, unit, expected severity] against the starter limit of 45° (common practice)
    ['44.9', 'degrees', 'ok'],
    ['45', 'degrees', 'ok'],
    ['45.1', 'degrees', 'soon'],
    ['0.125', 'turn', 'ok'],
    ['0.13', 'turn', 'soon'],
    ['0.25', 'turn', 'soon'],
  ] as const)('%s %s suggests %s', (value, unit, severity) => {
    expect(suggestSeverity(check('diff-backlash'), { kind: 'backlash', value, unit }).severity).toBe(severity)
  })
})

describe('differential operation test (common practice)', () => {
  const normal: DiffOperationSteps = {
    propTurnsWheelsSameWay: 'yes',
    heldPropOtherWheelOpposite: 'yes',
    heldWheelPropTurns: 'yes',
    wheelStiff: 'no',
    propWontStop: 'no',
  }
  it('is normal when all three steps behave and nothing binds', () => {
    expect(diffOperationVerdict(normal)).toBe('normal')
    expect(suggestSeverity(check('diff-operation'), { kind: 'diff-operation', steps: normal }).severity).toBe('ok')
  })
  it.each([
    ['a wheel stiff to turn', { wheelStiff: 'yes' }],
    ['a prop that turns both wheels the same and will not stop', { propWontStop: 'yes' }],
    ['a held prop where the other wheel does not turn the opposite way', { heldPropOtherWheelOpposite: 'no' }],
    ['a held wheel where the prop does not turn', { heldWheelPropTurns: 'no' }],
  ] as const)('finds the unit faulty for %s', (_label, change) => {
    const steps = { ...normal, ...change }
    expect(diffOperationVerdict(steps)).toBe('faulty')
    expect(suggestSeverity(check('diff-operation'), { kind: 'diff-operation', steps }).severity).toBe('urgent')
  })
})

describe('centre differential test (common practice)', () => {
  it.each([
    [{ unlockedOutputsIndependent: 'yes', lockedOutputsTogether: 'yes', largeLagBetweenOutputs: 'no' }, 'normal'],
    [{ unlockedOutputsIndependent: 'yes', lockedOutputsTogether: 'no', largeLagBetweenOutputs: 'no' }, 'faulty'],
    [{ unlockedOutputsIndependent: 'yes', lockedOutputsTogether: 'yes', largeLagBetweenOutputs: 'yes' }, 'faulty'],
  ] as const)('%j is %s', (steps, verdict) => {
    expect(centreDiffVerdict(steps)).toBe(verdict)
  })
  it('names excessive backlash when the outputs lag', () => {
    const s = suggestSeverity(check('tbox-centre-diff'), {
      kind: 'centre-diff',
      steps: { unlockedOutputsIndependent: 'yes', lockedOutputsTogether: 'yes', largeLagBetweenOutputs: 'yes' },
    })
    expect(s).toEqual({ severity: 'soon', detail: 'Excessive backlash between outputs' })
  })
})

describe('prop shaft checks (common practice)', () => {
  it('flags a slider fitted toward the axle', () => {
    expect(suggestSeverity(check('prop-slider-orientation'), { kind: 'slider-orientation', towardGearbox: false }).severity).toBe('watch')
    expect(suggestSeverity(check('prop-slider-orientation'), { kind: 'slider-orientation', towardGearbox: true }).severity).toBe('ok')
  })
  it.each([
    ['none', 'ok'],
    ['slight', 'watch'],
    ['worn', 'soon'],
  ])('UJ play %s suggests %s', (value, severity) => {
    expect(suggestSeverity(check('prop-uj-play'), { kind: 'choice', value }).severity).toBe(severity)
  })
  it('treats loose flange bolts as urgent', () => {
    expect(suggestSeverity(check('prop-flange-bolts'), { kind: 'pass-fail', passed: false }).severity).toBe('urgent')
  })
  it('rates spline play at the slider', () => {
    expect(suggestSeverity(check('prop-spline-play'), { kind: 'pass-fail', passed: false }).severity).toBe('soon')
  })
})

describe('swivel housing (common practice: a light weep is normal, a wet leak is a fault)', () => {
  it.each([
    ['none', 'ok'],
    ['weep', 'watch'],
    ['leak', 'soon'],
  ])('%s suggests %s', (value, severity) => {
    expect(suggestSeverity(check('swivel-leak'), { kind: 'choice', value }).severity).toBe(severity)
  })
  it('rusted ball surface calls for replacement now', () => {
    expect(suggestSeverity(check('swivel-ball'), { kind: 'choice', value: 'rust' }).severity).toBe('urgent')
  })
  it('refuses a reading that does not fit the check', () => {
    expect(() => suggestSeverity(check('swivel-leak'), { kind: 'choice', value: 'gushing' })).toThrow(/not one of the choices/)
    expect(() => suggestSeverity(check('swivel-leak'), { kind: 'pass-fail', passed: true })).toThrow(/does not fit/)
  })
})

describe('measurement thresholds', () => {
  const measured: CheckDefinition = {
    ...check('swivel-leak'),
    code: 'play-mm',
    input: {
      kind: 'measurement',
      unit: 'mm',
      thresholds: [
        { above: '0.5', severity: 'watch' },
        { above: '1.5', severity: 'urgent' },
      ],
    },
  }
  it.each([
    ['0.5', 'ok'],
    ['0.51', 'watch'],
    ['1.5', 'watch'],
    ['1.6', 'urgent'],
  ])('%s mm suggests %s', (value, severity) => {
    expect(suggestSeverity(measured, { kind: 'measurement', value }).severity).toBe(severity)
  })
})

describe('axle stands (common practice: rated capacity above the axle load; local rules decide)', () => {
  it.each([
    [{ standCapacityKg: 2000, capacityBasis: 'per-stand', standCount: 2, axleLoadKg: 1800 }, true, 4000],
    [{ standCapacityKg: 2000, capacityBasis: 'per-pair', standCount: 2, axleLoadKg: 1800 }, true, 2000],
    [{ standCapacityKg: 1500, capacityBasis: 'per-pair', standCount: 2, axleLoadKg: 1800 }, false, 1500],
    [{ standCapacityKg: 1500, capacityBasis: 'per-pair', standCount: 4, axleLoadKg: 1800 }, true, 3000],
    [{ standCapacityKg: 900, capacityBasis: 'per-stand', standCount: 2, axleLoadKg: 1800 }, true, 1800],
  ] as const)('%j covered=%s', (input, covered, total) => {
    expect(assessStands(input)).toMatchObject({ covered, totalCapacityKg: total })
  })

  it('refuses the safety step when the stands are rated below the axle load', () => {
    const parsed = SafetyCheckSchema.safeParse({
      standsOnFirmLevelGround: true,
      atLiftingPoints: true,
      wheelsChocked: true,
      notOnJackAlone: true,
      standCapacityKg: 1000,
      capacityBasis: 'per-pair',
      standCount: 2,
      axleLoadKg: 1800,
    })
    expect(parsed.success).toBe(false)
    expect(parsed.error?.issues[0]?.path).toEqual(['standCapacityKg'])
  })

  it('needs every caution confirmed', () => {
    const parsed = SafetyCheckSchema.safeParse({
      standsOnFirmLevelGround: true,
      atLiftingPoints: false,
      wheelsChocked: true,
      notOnJackAlone: true,
      standCapacityKg: 3000,
      capacityBasis: 'per-pair',
      standCount: 2,
      axleLoadKg: 1800,
    })
    expect(parsed.error?.issues.map((i) => i.path[0])).toEqual(['atLiftingPoints'])
  })
})

describe('the starter template', () => {
  it('is valid data and covers the drivetrain areas', () => {
    const parsed = TemplateDefinitionSchema.parse({ checks: starterChecks })
    expect(new Set(parsed.checks.map((c) => c.area))).toEqual(
      new Set(['swivel-housings', 'cv-joints', 'prop-shafts', 'axle-differentials', 'transfer-box', 'half-shafts-hubs']),
    )
  })
  it('refuses a template that uses a code twice', () => {
    const first = starterChecks[0]
    if (!first) throw new Error('empty starter')
    expect(TemplateDefinitionSchema.safeParse({ checks: [first, first] }).success).toBe(false)
  })
})
