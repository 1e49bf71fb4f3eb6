import { describe, expect, it } from 'vitest'
import { gradeSubmission } from '../../../shared/grading/grade'
import {
  REGIME_CHOICES,
  acceptsNeighbourRegime,
  regimeBoundaries,
  regimeCodeProblem,
} from '../../../shared/grading/regime'
import { validateAssignmentExpressions } from '../../../shared/modules/expressions'
import { DEFAULT_REGIME_MARGIN, ResultSpecSchema } from '../../../shared/modules/schema'
import { nozzlePressureRatios } from '../../../shared/physics'
import { expectClose } from '../../helpers/expect-close'
import { AREA_RATIO, STANDARD_ATMOSPHERE, cleanLog, rolesAssignment } from './fixtures'

const G = 1.4

/**
 * The regime bounds of the Mach-2 nozzle (ε = 1.6875), written out here:
 * - choke limit: p/p0 = (1 + 0.2 M²)^−3.5 at the subsonic M of A/A* = 1.6875 (found by bisection of
 *   the area–Mach relation below; NACA 1135 Table I gives M ≈ 0.372, p/p0 ≈ 0.909);
 * - design: 1.8^−3.5 = 0.12780 at M = 2; shock at exit: design × p2/p1 = design × (1 + 2γ/(γ+1)(M² − 1)) = 4.5 × design.
 */
function areaRatioAt(m: number): number {
  return (1 / m) * ((2 / (G + 1)) * (1 + ((G - 1) / 2) * m * m)) ** ((G + 1) / (2 * (G - 1)))
}
let lo = 0.01
let hi = 1
for (let i = 0; i < 200; i++) {
  const mid = (lo + hi) / 2
  if (areaRatioAt(mid) > AREA_RATIO) lo = mid
  else hi = mid
}
const CHOKE = (1 + 0.2 * lo * lo) ** -3.5
const DESIGN = 1.8 ** -3.5
const SHOCK_AT_EXIT = 4.5 * DESIGN
const ratios = nozzlePressureRatios(AREA_RATIO, G)

describe('regime boundaries and the neighbour rule', () => {
  it('the boundaries of ε = 1.6875 are the choke limit, the shock-at-exit ratio and the ±1 % ideal band around the design ratio', () => {
    expectClose(CHOKE, 0.9088, 1e-3)
    const [b1, b2, b3, b4] = regimeBoundaries(ratios)
    expectClose(b1, CHOKE, 1e-9)
    expectClose(b2, SHOCK_AT_EXIT, 1e-9)
    expectClose(b3, DESIGN * 1.01, 1e-9)
    expectClose(b4, DESIGN * 0.99, 1e-9)
  })

  it('accepts "shock in the nozzle" for an over-expanded nozzle at pa/p0 = 0.57, 0.9 % from the shock-at-exit ratio 0.5751; not at 0.55 (4.4 % away)', () => {
    expect(acceptsNeighbourRegime(2, 3, 0.57, ratios, 0.02)).toBe(true)
    expect(acceptsNeighbourRegime(2, 3, 0.55, ratios, 0.02)).toBe(false)
    // The same pair from the other side of the boundary, and a margin of 0 (exact match only).
    expect(acceptsNeighbourRegime(3, 2, SHOCK_AT_EXIT * 1.015, ratios, 0.02)).toBe(true)
    expect(acceptsNeighbourRegime(2, 3, 0.57, ratios, 0)).toBe(false)
  })

  it('accepts only the neighbour across the boundary that is near: not a code two away, nor the neighbour on the far side', () => {
    expect(acceptsNeighbourRegime(1, 3, 0.57, ratios, 0.02)).toBe(false)
    expect(acceptsNeighbourRegime(4, 3, 0.57, ratios, 0.02)).toBe(false)
    expect(acceptsNeighbourRegime(3, 3, 0.57, ratios, 0.02)).toBe(false)
  })

  it('in the ideal band (pa/p0 = the design ratio) both over- and under-expanded are within 2 % of their boundary', () => {
    expect(acceptsNeighbourRegime(3, 4, DESIGN, ratios, 0.02)).toBe(true)
    expect(acceptsNeighbourRegime(5, 4, DESIGN, ratios, 0.02)).toBe(true)
    // Near the choke limit: subsonic against shock in the nozzle.
    expect(acceptsNeighbourRegime(1, 2, CHOKE * 0.99, ratios, 0.02)).toBe(true)
  })

  it('the form offers the five regimes in words, codes 1–5 in order; anything else is refused with the choices named', () => {
    expect(REGIME_CHOICES.map((c) => [c.code, c.label])).toEqual([
      [1, 'Subsonic'],
      [2, 'Shock in the nozzle'],
      [3, 'Over-expanded'],
      [4, 'Ideally expanded'],
      [5, 'Under-expanded'],
    ])
    expect(regimeCodeProblem('Regime', 3)).toBeNull()
    expect(regimeCodeProblem('Regime', 6)).toMatch(
      /^Regime: choose one of the regimes \(1 subsonic, 2 shock in the nozzle/,
    )
    expect(regimeCodeProblem('Regime', 2.5)).not.toBeNull()
  })
})

const FLOW = `nozzleFlow({chamberPressure: max(p_chamber), chamberTemperature: 293.15, ambientPressure: p_ambient,
  throatArea: areaFromDiameter(d_throat), exitArea: areaFromDiameter(d_exit), gamma: 1.4, gasConstant: 287.05})`

function regimeAssignment(regime: Record<string, unknown> | undefined) {
  return rolesAssignment({
    results: [
      {
        key: 'regime',
        label: 'Regime at the peak chamber pressure',
        unit: '1',
        expected: `regimeCode(${FLOW}.regime)`,
        tolerance: { absolute: 0 },
        points: 1,
        ...(regime ? { regime } : {}),
      },
    ],
  })
}

const REGIME = { pressureRatio: 'p_ambient / max(p_chamber)', areaRatio: '(d_exit / d_throat)^2' }

function outcome(assignment: ReturnType<typeof regimeAssignment>, pressureRatio: number, reported: number) {
  // cleanLog's plateau is the peak chamber pressure: p0 = pa / (pa/p0).
  const data = cleanLog({ chamberPressure: STANDARD_ATMOSPHERE / pressureRatio })
  return gradeSubmission({ assignment, data, reported: { regime: reported } }).checks[0]!
}

describe('a regime result in the grading engine', () => {
  it('at pa/p0 1 % above the shock-at-exit ratio (shock in the nozzle, code 2), "over-expanded" (3) earns the points; "subsonic" (1) does not', () => {
    const a = regimeAssignment(REGIME)
    expect(a.results[0]!.regime?.margin).toBe(DEFAULT_REGIME_MARGIN)
    const exact = outcome(a, SHOCK_AT_EXIT * 1.01, 2)
    expect(exact.expected).toBe(2)
    expect(exact.outcome).toBe('pass')
    const neighbour = outcome(a, SHOCK_AT_EXIT * 1.01, 3)
    expect(neighbour.outcome).toBe('pass')
    expect(neighbour.pointsAwarded).toBe(1)
    expect(outcome(a, SHOCK_AT_EXIT * 1.01, 1).outcome).toBe('fail')
  })

  it('far from a boundary (pa/p0 = 0.45, over-expanded) the neighbour fails; without a regime block, or with margin 0, the code must match', () => {
    expect(outcome(regimeAssignment(REGIME), 0.45, 2).outcome).toBe('fail')
    expect(outcome(regimeAssignment(undefined), SHOCK_AT_EXIT * 1.01, 3).outcome).toBe('fail')
    expect(outcome(regimeAssignment({ ...REGIME, margin: 0 }), SHOCK_AT_EXIT * 1.01, 3).outcome).toBe('fail')
    expect(outcome(regimeAssignment({ ...REGIME, margin: 0.005 }), SHOCK_AT_EXIT * 1.01, 3).outcome).toBe('fail')
  })
})

describe('the regime block of a result, as a module declares it', () => {
  const base = {
    key: 'regime',
    label: 'Regime',
    expected: 'regimeCode("ideal")',
    tolerance: { absolute: 0 },
    points: 1,
  }

  it('needs a pure-number result and a margin from 0 to 0.2', () => {
    expect(ResultSpecSchema.safeParse({ ...base, unit: '1', regime: REGIME }).success).toBe(true)
    const unit = ResultSpecSchema.safeParse({ ...base, unit: 'N', regime: REGIME })
    expect(unit.error?.issues[0]?.message).toMatch(/pure number/)
    const margin = ResultSpecSchema.safeParse({ ...base, unit: '1', regime: { ...REGIME, margin: 0.5 } })
    expect(margin.error?.issues[0]?.message).toMatch(/regime margin is a fraction from 0 to 0.2/)
  })

  it('has its expressions checked when the module is saved, at their own path', () => {
    const a = regimeAssignment({ ...REGIME, pressureRatio: 'p_ambient / max(p_nowhere)' })
    const issues = validateAssignmentExpressions(a)
    expect(issues.map((i) => i.path.join('.'))).toEqual(['assignment.results.0.regime.pressureRatio'])
  })
})
