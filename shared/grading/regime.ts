/**
 * A result that is a nozzle's expansion regime: the regimes in words for the hand-in form (the
 * server still receives the code, 1 subsonic … 5 under-expanded, the order of NOZZLE_REGIMES), and
 * the rule that accepts the neighbouring regime when the pressure ratio sits next to the boundary
 * between the two — where no measurement of a teaching stand could tell them apart.
 *
 * Pure, and free of the expression engine, so the browser can use the words and the server the rule.
 */
import { IDEAL_EXPANSION_BAND, NOZZLE_REGIMES, nozzlePressureRatios } from '../physics'
import type { NozzlePressureRatios, NozzleRegime } from '../physics'
import type { RegimeSpec } from '../modules/schema'

/** One regime as the hand-in form offers it. */
export interface RegimeChoice {
  /** What the server receives and the expected-value expression gives (regimeCode). */
  code: number
  regime: NozzleRegime
  /** The choice's words. */
  label: string
  /** One line on what it means, shown under the choice. */
  hint: string
}

/** The regimes in the order of falling back pressure, with their codes 1–5. */
export const REGIME_CHOICES: readonly RegimeChoice[] = NOZZLE_REGIMES.map((regime, i) => ({
  code: i + 1,
  regime,
  ...(
    {
      subsonic: { label: 'Subsonic', hint: 'subsonic throughout: the throat is not choked' },
      'shock-in-nozzle': {
        label: 'Shock in the nozzle',
        hint: 'choked, with a normal shock standing inside the diverging part',
      },
      overexpanded: { label: 'Over-expanded', hint: 'supersonic exit, exit pressure below ambient' },
      ideal: { label: 'Ideally expanded', hint: 'supersonic exit, exit pressure equal to ambient (within 1 %)' },
      underexpanded: { label: 'Under-expanded', hint: 'supersonic exit, exit pressure above ambient' },
    } satisfies Record<NozzleRegime, { label: string; hint: string }>
  )[regime],
}))

/**
 * The back-to-chamber pressure ratios pa/p0 between neighbouring regimes: index k is the boundary
 * between code k + 1 and code k + 2 (subsonic | shock in nozzle at the choke limit, shock in nozzle |
 * over-expanded at the shock-at-exit ratio, and the two edges of the ideal band around the design
 * ratio, ±{@link IDEAL_EXPANSION_BAND} of the design exit pressure).
 *
 * @param ratios - the nozzle's regime bounds (nozzlePressureRatios)
 * @returns four ratios, falling
 * @example
 * regimeBoundaries(nozzlePressureRatios(1.6875, 1.4)) // → [0.9088, 0.5751, 0.1291, 0.1265]
 */
export function regimeBoundaries(ratios: NozzlePressureRatios): [number, number, number, number] {
  return [
    ratios.chokeLimit,
    ratios.shockAtExit,
    ratios.design * (1 + IDEAL_EXPANSION_BAND),
    ratios.design * (1 - IDEAL_EXPANSION_BAND),
  ]
}

/**
 * Whether a reported regime code one off the expected code is accepted: pa/p0 lies within
 * `margin` (relative) of the boundary between the two regimes.
 *
 * @param reported - the reported code
 * @param expected - the expected code
 * @param pressureRatio - pa/p0 at the moment the regime is asked about
 * @param ratios - the nozzle's regime bounds
 * @param margin - relative margin, e.g. 0.02 for 2 %
 * @returns true for a neighbouring code near its boundary; false otherwise (also for equal codes:
 *   those pass on their own)
 * @example
 * // ε = 1.6875: shock at exit at pa/p0 = 0.5751; at 0.57 the nozzle is over-expanded (3), and
 * // 0.57 is within 2 % of 0.5751, so "shock in the nozzle" (2) is accepted too.
 * acceptsNeighbourRegime(2, 3, 0.57, nozzlePressureRatios(1.6875, 1.4), 0.02) // → true
 */
export function acceptsNeighbourRegime(
  reported: number,
  expected: number,
  pressureRatio: number,
  ratios: NozzlePressureRatios,
  margin: number,
): boolean {
  if (!Number.isInteger(reported) || !Number.isInteger(expected) || Math.abs(reported - expected) !== 1) return false
  if (!Number.isFinite(pressureRatio) || !(margin >= 0)) return false
  const boundary = regimeBoundaries(ratios)[Math.min(reported, expected) - 1]
  if (boundary === undefined) return false
  return Math.abs(pressureRatio - boundary) <= margin * boundary
}

/**
 * The module's regime rule for one check: evaluates the result's `regime.pressureRatio` and
 * `regime.areaRatio` expressions over the submission's data and applies
 * {@link acceptsNeighbourRegime}. An expression that fails or gives no usable number accepts
 * nothing: the exact match still decides.
 *
 * @param spec - the result's `regime` block
 * @param evaluate - evaluates an expression over the submission's data (SI)
 * @param reported - the reported code
 * @param expected - the expected code
 */
export function regimeNeighbourAccepted(
  spec: RegimeSpec,
  evaluate: (expression: string) => unknown,
  reported: number,
  expected: number,
): boolean {
  if (Math.abs(reported - expected) !== 1) return false
  try {
    const pressureRatio = evaluate(spec.pressureRatio)
    const areaRatio = evaluate(spec.areaRatio)
    if (typeof pressureRatio !== 'number' || typeof areaRatio !== 'number') return false
    return acceptsNeighbourRegime(
      reported,
      expected,
      pressureRatio,
      nozzlePressureRatios(areaRatio, spec.gamma),
      spec.margin,
    )
  } catch {
    return false
  }
}

/**
 * Why a value cannot be a regime code, or null when it is one.
 *
 * @param label - the result's label, for the message
 * @param value - the value received
 */
export function regimeCodeProblem(label: string, value: number): string | null {
  if (REGIME_CHOICES.some((c) => c.code === value)) return null
  return `${label}: choose one of the regimes (${REGIME_CHOICES.map((c) => `${c.code} ${c.label.toLowerCase()}`).join(', ')}).`
}
