/**
 * Specific heat, enthalpy and entropy of one species or an ideal-gas mixture from the NASA
 * 7-coefficient polynomials in `species-data.ts`.
 *
 * Source of the polynomial form: Gordon & McBride, NASA RP-1311 (1994), eq. 4.9–4.11; McBride,
 * Zehe & Gordon, NASA/TP-2002-211556 (2002), §2 (the 7-term form of the older NASA and CHEMKIN
 * files). All results are dimensionless: multiply by R̄ = 8.314462618 J/(mol·K) (and by T for h).
 * Outside a species' fitted range the polynomial of the nearer range is extrapolated; the
 * combustion functions stay inside the ranges for every input they accept at ordinary conditions.
 */
import { requireOneOf, requirePositive } from '../physics/validate'
import { SPECIES } from './species-data'
import type { NasaCoefficients, SpeciesData, SpeciesName } from './species-data'

/** Molar gas constant R̄, J/(mol·K). Exact since the 2019 SI (N_A·k, both exact). */
export const MOLAR_GAS_CONSTANT = 8.314462618

/** Reference (standard-state) pressure of the polynomials, Pa: 1 bar. */
export const REFERENCE_PRESSURE = 100000

function coefficientsAt(species: SpeciesData, temperature: number): NasaCoefficients {
  return temperature <= species.temperatureRange.common ? species.low : species.high
}

/** cp/R of a species without argument checks (used inside the solver). */
export function cpOverRUnchecked(species: SpeciesData, t: number): number {
  const a = coefficientsAt(species, t)
  return a[0] + t * (a[1] + t * (a[2] + t * (a[3] + t * a[4])))
}

/** h/(RT) of a species without argument checks. */
export function enthalpyOverRTUnchecked(species: SpeciesData, t: number): number {
  const a = coefficientsAt(species, t)
  return a[0] + t * (a[1] / 2 + t * (a[2] / 3 + t * (a[3] / 4 + (t * a[4]) / 5))) + a[5] / t
}

/** s°/R of a species at the reference pressure, without argument checks. */
export function entropyOverRUnchecked(species: SpeciesData, t: number): number {
  const a = coefficientsAt(species, t)
  return a[0] * Math.log(t) + t * (a[1] + t * (a[2] / 2 + t * (a[3] / 3 + (t * a[4]) / 4))) + a[6]
}

const SPECIES_NAMES = Object.keys(SPECIES) as SpeciesName[]

function speciesNamed(name: SpeciesName, argument = 'species'): SpeciesData {
  return SPECIES[requireOneOf(argument, name, SPECIES_NAMES)]
}

/**
 * Dimensionless specific heat at constant pressure of one species: cp/R = a1 + a2·T + a3·T² + a4·T³ + a5·T⁴.
 *
 * Source: NASA RP-1311 eq. 4.9; coefficients GRI-Mech 3.0 thermo30.dat.
 *
 * @param name - species formula, e.g. 'H2O'
 * @param temperature - K, > 0 (the fits cover 200–3500 K or more)
 * @returns cp/R, dimensionless
 * @example
 * cpOverR('N2', 298.15) // ≈ 3.4965 (cp ≈ 29.07 J/(mol·K))
 */
export function cpOverR(name: SpeciesName, temperature: number): number {
  requirePositive('temperature', temperature)
  return cpOverRUnchecked(speciesNamed(name), temperature)
}

/**
 * Dimensionless enthalpy h/(RT) of one species, including the heat of formation at 298.15 K:
 * h/RT = a1 + a2·T/2 + a3·T²/3 + a4·T³/4 + a5·T⁴/5 + a6/T.
 *
 * Source: NASA RP-1311 eq. 4.10; coefficients GRI-Mech 3.0 thermo30.dat.
 *
 * @param name - species formula
 * @param temperature - K, > 0
 * @returns h/(R·T), dimensionless
 * @example
 * enthalpyOverRT('H2O', 298.15) * 8.314462618 * 298.15 // ≈ −241 826 J/mol (heat of formation)
 */
export function enthalpyOverRT(name: SpeciesName, temperature: number): number {
  requirePositive('temperature', temperature)
  return enthalpyOverRTUnchecked(speciesNamed(name), temperature)
}

/**
 * Dimensionless standard entropy s°/R of one species at the reference pressure (1 bar):
 * s°/R = a1·ln T + a2·T + a3·T²/2 + a4·T³/3 + a5·T⁴/4 + a7.
 *
 * Source: NASA RP-1311 eq. 4.11; coefficients GRI-Mech 3.0 thermo30.dat.
 *
 * @param name - species formula
 * @param temperature - K, > 0
 * @returns s°/R, dimensionless
 * @example
 * entropyOverR('O2', 298.15) * 8.314462618 // ≈ 205.15 J/(mol·K)
 */
export function entropyOverR(name: SpeciesName, temperature: number): number {
  requirePositive('temperature', temperature)
  return entropyOverRUnchecked(speciesNamed(name), temperature)
}

/** Mole fractions by species; species left out count as 0. */
export type Composition = Readonly<Partial<Record<SpeciesName, number>>>

function eachFraction(composition: Composition, visit: (species: SpeciesData, x: number) => void): void {
  for (const [name, x] of Object.entries(composition)) {
    if (x === undefined || x === 0) continue
    if (!(typeof x === 'number' && Number.isFinite(x) && x >= 0)) {
      throw new RangeError(`composition.${name} must be a finite number of at least 0 (got ${String(x)})`)
    }
    visit(speciesNamed(name as SpeciesName, 'composition'), x)
  }
}

/**
 * cp/R per mole of an ideal-gas mixture (frozen composition): Σ xⱼ·cpⱼ/R.
 *
 * Source: ideal-gas mixing (NASA RP-1311 eq. 2.59, frozen part).
 *
 * @param composition - mole fractions (summing to 1)
 * @param temperature - K, > 0
 * @returns cp/R of the mixture, dimensionless (per mole of mixture)
 * @example
 * mixtureCpOverR({ O2: 0.21, N2: 0.79 }, 298.15) // ≈ 3.50
 */
export function mixtureCpOverR(composition: Composition, temperature: number): number {
  requirePositive('temperature', temperature)
  let sum = 0
  eachFraction(composition, (species, x) => (sum += x * cpOverRUnchecked(species, temperature)))
  return sum
}

/**
 * h/(RT) per mole of an ideal-gas mixture: Σ xⱼ·hⱼ/(RT).
 *
 * Source: ideal-gas mixing (NASA RP-1311 eq. 2.14 divided by n).
 *
 * @param composition - mole fractions
 * @param temperature - K, > 0
 * @returns h/(R·T) of the mixture, dimensionless
 * @example
 * mixtureEnthalpyOverRT({ O2: 0.21, N2: 0.79 }, 298.15) // ≈ 0 (elements in their reference state)
 */
export function mixtureEnthalpyOverRT(composition: Composition, temperature: number): number {
  requirePositive('temperature', temperature)
  let sum = 0
  eachFraction(composition, (species, x) => (sum += x * enthalpyOverRTUnchecked(species, temperature)))
  return sum
}

/**
 * s/R per mole of an ideal-gas mixture at pressure p: Σ xⱼ·(s°ⱼ/R − ln xⱼ − ln(p/p°)), p° = 1 bar.
 *
 * Source: NASA RP-1311 eq. 2.16–2.17 (entropy of a gaseous species in a mixture).
 *
 * @param composition - mole fractions (summing to 1)
 * @param temperature - K, > 0
 * @param pressure - Pa, > 0
 * @returns s/R of the mixture, dimensionless (per mole of mixture)
 * @example
 * mixtureEntropyOverR({ O2: 0.21, N2: 0.79 }, 298.15, 101325) // ≈ 23.39
 */
export function mixtureEntropyOverR(composition: Composition, temperature: number, pressure: number): number {
  requirePositive('temperature', temperature)
  requirePositive('pressure', pressure)
  const lnP = Math.log(pressure / REFERENCE_PRESSURE)
  let sum = 0
  eachFraction(
    composition,
    (species, x) => (sum += x * (entropyOverRUnchecked(species, temperature) - Math.log(x) - lnP)),
  )
  return sum
}
