/**
 * The thermochemistry library: adiabatic flame temperature and equilibrium products of methane,
 * propane and hydrogen burned with air (O2 + 3.76 N2 by mole), and the species properties behind
 * them. SI units: Pa (absolute), K, kg/mol, J/(kg·K), m/s. Bad arguments throw a RangeError naming
 * the argument. See README.md for the method and sources.
 */
export {
  combustion,
  mixtureRatioFromEquivalenceRatio,
  equivalenceRatioFromMixtureRatio,
  clearCombustionCache,
  COMBUSTION_CACHE_SIZE,
  DEFAULT_REACTANT_TEMPERATURE,
  MAX_REACTANT_TEMPERATURE,
  EQUIVALENCE_RATIO_RANGE,
  FUELS,
  NITROGEN_PER_OXYGEN,
  PRODUCT_SPECIES,
} from './combustion'
export type { CombustionInput, CombustionResult, Fuel, ProductSpecies } from './combustion'
export {
  cpOverR,
  enthalpyOverRT,
  entropyOverR,
  mixtureCpOverR,
  mixtureEnthalpyOverRT,
  mixtureEntropyOverR,
  MOLAR_GAS_CONSTANT,
  REFERENCE_PRESSURE,
} from './properties'
export type { Composition } from './properties'
export { SPECIES, ELEMENTS, ATOMIC_WEIGHT } from './species-data'
export type { Element, NasaCoefficients, SpeciesData, SpeciesName } from './species-data'
