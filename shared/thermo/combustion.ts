/**
 * Adiabatic flame properties of a fuel burned with air at constant pressure, products in chemical
 * equilibrium, and the air-to-fuel ratio helpers.
 *
 * Air is O2 + 3.76 N2 by mole (the combustion-textbook convention, e.g. Turns, An Introduction to
 * Combustion, §2; argon counted as nitrogen). One mole of fuel CₓHᵧ burns with a/φ mol of O2, where
 * a = x + y/4 is the stoichiometric oxygen.
 */
import { requireInterval, requireObject, requireOneOf, requirePositive } from '../physics/validate'
import { equilibriumSystem, solveEquilibrium } from './equilibrium'
import type { EquilibriumSystem } from './equilibrium'
import { MOLAR_GAS_CONSTANT, cpOverRUnchecked, enthalpyOverRTUnchecked } from './properties'
import { ELEMENTS, SPECIES } from './species-data'
import type { Element, SpeciesData, SpeciesName } from './species-data'

/** The fuels the library burns. */
export type Fuel = 'methane' | 'propane' | 'hydrogen'

/** The fuels, in the order a form offers them. */
export const FUELS: readonly Fuel[] = ['methane', 'propane', 'hydrogen']

/** The species of the products, keys of {@link CombustionResult.moleFractions}. */
export const PRODUCT_SPECIES = ['N2', 'O2', 'CO2', 'H2O', 'CO', 'H2', 'OH', 'H', 'O', 'NO', 'N'] as const

/** A product species name. */
export type ProductSpecies = (typeof PRODUCT_SPECIES)[number]

/** The equivalence ratios `combustion` accepts: the span the solver is checked over. */
export const EQUIVALENCE_RATIO_RANGE = { min: 0.4, max: 2.5 } as const

/** Reactant temperature when none is given, K. */
export const DEFAULT_REACTANT_TEMPERATURE = 298.15

/**
 * Highest reactant temperature accepted, K. Hotter reactants would put the flame beyond the species
 * data (fitted to 3500–6000 K); the lab's reactants are near room temperature.
 */
export const MAX_REACTANT_TEMPERATURE = 3000

/** Moles of N2 per mole of O2 in air. */
export const NITROGEN_PER_OXYGEN = 3.76

const FUEL_SPECIES: Readonly<Record<Fuel, SpeciesName>> = { methane: 'CH4', propane: 'C3H8', hydrogen: 'H2' }

/** Inputs of {@link combustion}. */
export interface CombustionInput {
  fuel: Fuel
  /** φ = (fuel/air) / (fuel/air)stoichiometric, 0.4–2.5. */
  equivalenceRatio: number
  /** Pa (absolute), > 0. */
  pressure: number
  /** K, > 0 and at most 3000; 298.15 when left out. Fuel and air enter at this temperature. */
  reactantTemperature?: number
}

/** Equilibrium flame properties returned by {@link combustion}. */
export interface CombustionResult {
  /** Adiabatic flame temperature at constant pressure, K. */
  temperature: number
  /** Molar mass of the equilibrium products, kg/mol. */
  molarMass: number
  /** Frozen ratio of specific heats of the products at `temperature`, cp/(cp − R). */
  gamma: number
  /** Frozen specific heat at constant pressure of the products at `temperature`, J/(kg·K). */
  cp: number
  /** Ideal characteristic velocity √(R̄·T/M)/Γ(γ), m/s. */
  characteristicVelocity: number
  /** Air-to-fuel mass ratio. */
  mixtureRatio: number
  /** Mole fractions of the equilibrium products; 0 for species whose element is absent. */
  moleFractions: Record<ProductSpecies, number>
}

function fuelSpecies(fuel: Fuel): SpeciesData {
  return SPECIES[FUEL_SPECIES[fuel]]
}

/** Stoichiometric O2 per mole of fuel, a = x + y/4 (no oxygen in these fuels). */
function stoichiometricOxygen(fuel: SpeciesData): number {
  return (fuel.elements.C ?? 0) + (fuel.elements.H ?? 0) / 4
}

/** Mass of air (O2 + 3.76 N2) per mole of O2, kg/mol. */
function airMassPerOxygen(): number {
  return SPECIES.O2.molarMass + NITROGEN_PER_OXYGEN * SPECIES.N2.molarMass
}

/**
 * Air-to-fuel mass ratio of a mixture of given equivalence ratio:
 * AF = (a/φ)·(M_O2 + 3.76·M_N2) / M_fuel, with a = x + y/4 mol O2 per mol CₓHᵧ.
 *
 * Source: Turns, An Introduction to Combustion, 2nd ed., eq. 2.31–2.33 (from memory), with air as
 * O2 + 3.76 N2.
 *
 * @param fuel - 'methane', 'propane' or 'hydrogen'
 * @param equivalenceRatio - φ, finite and > 0 (not limited to the range `combustion` accepts)
 * @returns air-to-fuel mass ratio, dimensionless
 * @example
 * mixtureRatioFromEquivalenceRatio('methane', 1) // ≈ 17.12
 */
export function mixtureRatioFromEquivalenceRatio(fuel: Fuel, equivalenceRatio: number): number {
  const species = fuelSpecies(requireOneOf('fuel', fuel, FUELS))
  requirePositive('equivalenceRatio', equivalenceRatio)
  return (stoichiometricOxygen(species) * airMassPerOxygen()) / (equivalenceRatio * species.molarMass)
}

/**
 * Equivalence ratio of a mixture of given air-to-fuel mass ratio: φ = AF_stoichiometric / AF
 * (the inverse of {@link mixtureRatioFromEquivalenceRatio}).
 *
 * Source: Turns, An Introduction to Combustion, 2nd ed., eq. 2.33 (from memory).
 *
 * @param fuel - 'methane', 'propane' or 'hydrogen'
 * @param mixtureRatio - air-to-fuel mass ratio, finite and > 0
 * @returns φ, dimensionless (may lie outside the range `combustion` accepts)
 * @example
 * equivalenceRatioFromMixtureRatio('propane', 15.57) // ≈ 1.0
 */
export function equivalenceRatioFromMixtureRatio(fuel: Fuel, mixtureRatio: number): number {
  const species = fuelSpecies(requireOneOf('fuel', fuel, FUELS))
  requirePositive('mixtureRatio', mixtureRatio)
  return (stoichiometricOxygen(species) * airMassPerOxygen()) / (mixtureRatio * species.molarMass)
}

/**
 * Γ(γ) = √γ·(2/(γ+1))^((γ+1)/(2(γ−1))), the function of γ in the ideal characteristic velocity.
 *
 * Source: Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-32 (from memory).
 */
function vandenkerckhove(gamma: number): number {
  return Math.sqrt(gamma) * Math.pow(2 / (gamma + 1), (gamma + 1) / (2 * (gamma - 1)))
}

const SYSTEMS = new Map<Fuel, EquilibriumSystem>()
const PRODUCTS: readonly SpeciesData[] = PRODUCT_SPECIES.map((name) => SPECIES[name])

/** The equilibrium system of a fuel's products: only the elements present in fuel and air. */
function productSystem(fuel: Fuel): EquilibriumSystem {
  let system = SYSTEMS.get(fuel)
  if (!system) {
    const species = fuelSpecies(fuel)
    const elements = ELEMENTS.filter((e) => e === 'O' || e === 'N' || (species.elements[e] ?? 0) > 0)
    system = equilibriumSystem(PRODUCTS, elements)
    SYSTEMS.set(fuel, system)
  }
  return system
}

/** The computation behind {@link combustion}, on checked (and rounded) inputs. */
function computeCombustion(fuel: Fuel, phi: number, pressure: number, reactantTemperature: number): CombustionResult {
  const fuelData = fuelSpecies(fuel)
  const oxygen = stoichiometricOxygen(fuelData) / phi
  const nitrogen = NITROGEN_PER_OXYGEN * oxygen
  // Per mole of fuel: grams of reactants, element amounts, enthalpy/R.
  const grams = 1000 * (fuelData.molarMass + oxygen * SPECIES.O2.molarMass + nitrogen * SPECIES.N2.molarMass)
  const atoms: Record<Element, number> = {
    C: fuelData.elements.C ?? 0,
    H: fuelData.elements.H ?? 0,
    O: 2 * oxygen,
    N: 2 * nitrogen,
  }
  const tr = reactantTemperature
  const enthalpyOverR =
    (tr *
      (enthalpyOverRTUnchecked(fuelData, tr) +
        oxygen * enthalpyOverRTUnchecked(SPECIES.O2, tr) +
        nitrogen * enthalpyOverRTUnchecked(SPECIES.N2, tr))) /
    grams

  const system = productSystem(fuel)
  const elementAmounts = Float64Array.from(system.elements, (e) => atoms[e] / grams)
  const state = solveEquilibrium(system, elementAmounts, pressure, { enthalpyOverR })

  const t = state.temperature
  const moleFractions = Object.fromEntries(PRODUCT_SPECIES.map((name) => [name, 0])) as Record<ProductSpecies, number>
  let mass = 0
  let cpMolar = 0
  system.species.forEach((s, j) => {
    const nj = state.moles[j]!
    moleFractions[s.name as ProductSpecies] = nj / state.totalMoles
    mass += nj * s.molarMass
    cpMolar += nj * cpOverRUnchecked(s, t)
  })
  const molarMass = mass / state.totalMoles
  const cp = (MOLAR_GAS_CONSTANT * cpMolar) / mass
  const gasConstant = MOLAR_GAS_CONSTANT / molarMass
  const gamma = cp / (cp - gasConstant)
  return {
    temperature: t,
    molarMass,
    gamma,
    cp,
    characteristicVelocity: Math.sqrt(gasConstant * t) / vandenkerckhove(gamma),
    mixtureRatio: mixtureRatioFromEquivalenceRatio(fuel, phi),
    moleFractions,
  }
}

/** Most results kept by {@link combustion}'s cache. */
export const COMBUSTION_CACHE_SIZE = 256
const cache = new Map<string, CombustionResult>()

/** Empties the result cache of {@link combustion} (for benchmarks and tests). */
export function clearCombustionCache(): void {
  cache.clear()
}

function copyResult(result: CombustionResult): CombustionResult {
  return { ...result, moleFractions: { ...result.moleFractions } }
}

/**
 * Adiabatic, constant-pressure combustion of a fuel with air: flame temperature with the products
 * in chemical equilibrium, and the products' molar mass, frozen γ and cp, the ideal characteristic
 * velocity and the air-to-fuel mass ratio.
 *
 * Method: enthalpy of the equilibrium products = enthalpy of the reactants at `reactantTemperature`,
 * solved together with the Gibbs-energy minimum by element potentials and Newton iteration
 * (Gordon & McBride, NASA RP-1311, ch. 2, the assigned-enthalpy-and-pressure problem). Species data:
 * GRI-Mech 3.0 (see species-data.ts). c* = √(R̄·T/M)/Γ(γ), Γ(γ) = √γ·(2/(γ+1))^((γ+1)/(2(γ−1)))
 * (Sutton & Biblarz, Rocket Propulsion Elements, eq. 3-32, from memory), with the frozen γ.
 *
 * Results are cached (least recently used, {@link COMBUSTION_CACHE_SIZE} entries) keyed on the
 * fuel, φ to 12 significant digits and pressure and reactant temperature to 9; the computation uses
 * the rounded values, so a cached and a fresh result are identical. Each call returns a new object.
 *
 * @param input - fuel; equivalenceRatio 0.4–2.5; pressure in Pa, > 0; reactantTemperature in K,
 *   > 0 and at most 3000 (default 298.15)
 * @returns temperature K, molarMass kg/mol, gamma, cp J/(kg·K), characteristicVelocity m/s,
 *   mixtureRatio (air/fuel by mass), moleFractions
 * @example
 * combustion({ fuel: 'methane', equivalenceRatio: 1, pressure: 101325 }).temperature // ≈ 2225 K
 */
export function combustion(input: CombustionInput): CombustionResult {
  requireObject('input', input)
  const fuel = requireOneOf('fuel', input.fuel, FUELS)
  requireInterval(
    'equivalenceRatio',
    input.equivalenceRatio,
    { value: EQUIVALENCE_RATIO_RANGE.min, open: false },
    { value: EQUIVALENCE_RATIO_RANGE.max, open: false },
  )
  requirePositive('pressure', input.pressure)
  const reactantTemperature = input.reactantTemperature ?? DEFAULT_REACTANT_TEMPERATURE
  requireInterval(
    'reactantTemperature',
    reactantTemperature,
    { value: 0, open: true },
    { value: MAX_REACTANT_TEMPERATURE, open: false },
  )

  const phi = Number(input.equivalenceRatio.toPrecision(12))
  const pressure = Number(input.pressure.toPrecision(9))
  const temperature = Number(reactantTemperature.toPrecision(9))
  const key = `${fuel}|${phi}|${pressure}|${temperature}`
  let result = cache.get(key)
  if (result) {
    cache.delete(key) // re-insert: Map keeps insertion order, so the first key is the least recently used
  } else {
    result = computeCombustion(fuel, phi, pressure, temperature)
    if (cache.size >= COMBUSTION_CACHE_SIZE) cache.delete(cache.keys().next().value!)
  }
  cache.set(key, result)
  return copyResult(result)
}
