import { describe, expect, it } from 'vitest'
import {
  FUELS,
  PRODUCT_SPECIES,
  SPECIES,
  clearCombustionCache,
  combustion,
  equivalenceRatioFromMixtureRatio,
  mixtureRatioFromEquivalenceRatio,
} from '../../shared/thermo'
import type { CombustionResult, Fuel } from '../../shared/thermo'
import { expectClose } from '../helpers/expect-close'
import { expectRangeError } from '../helpers/expect-range-error'

const ATM = 101325
const R = 8.314462618

/** Atoms of carbon and hydrogen in one molecule of each fuel, and its stoichiometric O2 (x + y/4). */
const FORMULA: Record<Fuel, { c: number; h: number; oxygen: number }> = {
  methane: { c: 1, h: 4, oxygen: 2 },
  propane: { c: 3, h: 8, oxygen: 5 },
  hydrogen: { c: 0, h: 2, oxygen: 0.5 },
}

/** Element amounts in the products per mole of mixture, from the mole fractions (formulas written out here). */
function productElements(x: CombustionResult['moleFractions']): { C: number; H: number; O: number; N: number } {
  return {
    C: x.CO2 + x.CO,
    H: 2 * x.H2O + 2 * x.H2 + x.OH + x.H,
    O: 2 * x.O2 + 2 * x.CO2 + x.H2O + x.CO + x.OH + x.O + x.NO,
    N: 2 * x.N2 + x.NO + x.N,
  }
}

describe('combustion: adiabatic flame temperature against a textbook table', () => {
  // Turns, An Introduction to Combustion (2nd ed.), table of adiabatic flame temperatures of
  // stoichiometric fuel–air mixtures at 1 atm from 298 K with equilibrium products (from memory):
  // methane 2226 K, propane 2267 K, hydrogen 2383 K. Within 1 %.
  const table: [Fuel, number][] = [
    ['methane', 2226],
    ['propane', 2267],
    ['hydrogen', 2383],
  ]
  for (const [fuel, temperature] of table) {
    it(`stoichiometric ${fuel}–air at 1 atm from 298 K: ${temperature} K`, () => {
      expectClose(combustion({ fuel, equivalenceRatio: 1, pressure: ATM }).temperature, temperature, 0.01, fuel)
    })
  }

  it('peaks slightly rich of stoichiometric (φ ≈ 1.02–1.12) and falls off lean and rich (Turns, fig. of T_ad against φ, from memory)', () => {
    for (const fuel of FUELS) {
      let best = 0
      let peak = 0
      for (let phi = 0.9; phi <= 1.2 + 1e-9; phi += 0.01) {
        const t = combustion({ fuel, equivalenceRatio: phi, pressure: ATM }).temperature
        if (t > best) [best, peak] = [t, phi]
      }
      expect(peak, `${fuel} peak φ`).toBeGreaterThanOrEqual(1.02)
      expect(peak, `${fuel} peak φ`).toBeLessThanOrEqual(1.12)
      // Monotone on both sides of the peak over the whole accepted range.
      const lean = [0.4, 0.6, 0.8, 1].map(
        (phi) => combustion({ fuel, equivalenceRatio: phi, pressure: ATM }).temperature,
      )
      const rich = [1.2, 1.5, 2, 2.5].map(
        (phi) => combustion({ fuel, equivalenceRatio: phi, pressure: ATM }).temperature,
      )
      for (let i = 1; i < 4; i++) {
        expect(lean[i]!, `${fuel} lean`).toBeGreaterThan(lean[i - 1]!)
        expect(rich[i]!, `${fuel} rich`).toBeLessThan(rich[i - 1]!)
      }
    }
  })

  it('higher pressure gives a higher flame temperature and less dissociation (Le Chatelier: dissociation adds moles, so pressure holds it back)', () => {
    for (const fuel of FUELS) {
      const low = combustion({ fuel, equivalenceRatio: 1, pressure: ATM })
      const high = combustion({ fuel, equivalenceRatio: 1, pressure: 20 * ATM })
      expect(high.temperature, fuel).toBeGreaterThan(low.temperature + 20)
      expect(high.moleFractions.OH, fuel).toBeLessThan(low.moleFractions.OH)
      expect(high.moleFractions.H2, fuel).toBeLessThan(low.moleFractions.H2)
    }
  })

  it('lean products approach complete combustion: φ = 0.5 methane at 1 atm has CO2 : H2O = 1 : 2 and the excess O2 (stoichiometry)', () => {
    const x = combustion({ fuel: 'methane', equivalenceRatio: 0.5, pressure: ATM }).moleFractions
    // CH4 + 4 (O2 + 3.76 N2) → CO2 + 2 H2O + 2 O2 + 15.04 N2: 20.04 mol.
    expectClose(x.CO2, 1 / 20.04, 1e-3, 'CO2')
    expectClose(x.H2O, 2 / 20.04, 1e-3, 'H2O')
    // Equilibrium NO (about 0.1 % at this ~1480 K) takes a little of the excess oxygen.
    expectClose(x.O2, 2 / 20.04, 1e-2, 'O2')
    expect(x.O2).toBeLessThan(2 / 20.04)
  })
})

describe('combustion: the equilibrium products', () => {
  const cases: [Fuel, number, number, number?][] = [
    ['methane', 0.4, ATM],
    ['methane', 1, 0.1e5],
    ['methane', 2.5, 100e5],
    ['propane', 0.85, 5e5, 400],
    ['propane', 1.7, ATM],
    ['hydrogen', 1, ATM],
    ['hydrogen', 2.5, 0.1e5],
    ['hydrogen', 0.4, 100e5, 250],
  ]
  for (const [fuel, phi, pressure, reactantTemperature] of cases) {
    it(`${fuel}, φ = ${phi}, ${pressure} Pa: elements conserved to 1e-10, fractions non-negative and summing to 1`, () => {
      const result = combustion({ fuel, equivalenceRatio: phi, pressure, reactantTemperature })
      const x = result.moleFractions
      expect(Object.keys(x).sort()).toEqual([...PRODUCT_SPECIES].sort())
      let sum = 0
      for (const value of Object.values(x)) {
        expect(value).toBeGreaterThanOrEqual(0)
        sum += value
      }
      expect(Math.abs(sum - 1)).toBeLessThan(1e-12)
      // Reactants per mole of fuel: C = c, H = h, O = 2a/φ, N = 2·3.76·a/φ (air = O2 + 3.76 N2).
      const { c, h, oxygen } = FORMULA[fuel]
      const o2 = oxygen / phi
      const reactants = { C: c, H: h, O: 2 * o2, N: 2 * 3.76 * o2 }
      const products = productElements(x)
      for (const element of ['C', 'H', 'O'] as const) {
        const expected = reactants[element] / reactants.N
        const actual = products[element] / products.N
        if (expected === 0) expect(actual, element).toBe(0)
        else expect(Math.abs(actual - expected) / expected, element).toBeLessThan(1e-10)
      }
      // Molar mass is the mole-fraction mean of the species' molar masses.
      const mean = PRODUCT_SPECIES.reduce((m, name) => m + x[name] * SPECIES[name].molarMass, 0)
      expectClose(result.molarMass, mean, 1e-12, 'molarMass')
      expect(result.temperature).toBeGreaterThan(1000)
      expect(result.temperature).toBeLessThan(3000)
    })
  }

  it('hydrogen leaves no carbon species (0, not missing)', () => {
    const x = combustion({ fuel: 'hydrogen', equivalenceRatio: 1, pressure: ATM }).moleFractions
    expect(x.CO2).toBe(0)
    expect(x.CO).toBe(0)
  })

  it('converges over the whole accepted range: φ 0.4–2.5, 0.1–100 bar, all three fuels', () => {
    for (const fuel of FUELS)
      for (const phi of [0.4, 0.55, 0.7, 0.9, 1, 1.1, 1.3, 1.6, 2, 2.5])
        for (const pressure of [0.1e5, 1e5, 10e5, 100e5]) {
          const result = combustion({ fuel, equivalenceRatio: phi, pressure })
          expect(Number.isFinite(result.temperature), `${fuel} ${phi} ${pressure}`).toBe(true)
          expect(result.gamma).toBeGreaterThan(1.15)
          expect(result.gamma).toBeLessThan(1.4)
        }
  })

  it('hotter reactants give a hotter flame (energy balance)', () => {
    const cold = combustion({ fuel: 'propane', equivalenceRatio: 1, pressure: ATM })
    const warm = combustion({ fuel: 'propane', equivalenceRatio: 1, pressure: ATM, reactantTemperature: 600 })
    expect(warm.temperature).toBeGreaterThan(cold.temperature + 100)
  })
})

describe('combustion: frozen gas properties and c*', () => {
  it('cp is the mass-weighted mixture cp at the flame temperature and γ = cp/(cp − R̄/M)', () => {
    const result = combustion({ fuel: 'methane', equivalenceRatio: 1, pressure: ATM })
    const gasConstant = R / result.molarMass
    expectClose(result.gamma, result.cp / (result.cp - gasConstant), 1e-12, 'gamma')
    // cp of the products should lie near 1.5 kJ/(kg·K) at ~2200 K (combustion-products charts, from memory).
    expect(result.cp).toBeGreaterThan(1400)
    expect(result.cp).toBeLessThan(1650)
  })

  it('c* of stoichiometric methane–air at 1 atm from textbook-level inputs (Sutton & Biblarz eq. 3-32, from memory)', () => {
    const result = combustion({ fuel: 'methane', equivalenceRatio: 1, pressure: ATM })
    // Independent inputs: T from the textbook table (Turns, 2226 K, from memory); M of the complete-
    // combustion products CO2 + 2 H2O + 7.52 N2 (stoichiometry, molar masses 44.01, 18.015, 28.014 g/mol);
    // γ from the library (checked above against its own cp).
    const molarMass = (44.009 + 2 * 18.015 + 7.52 * 28.014) / 10.52 / 1000
    const gamma = result.gamma
    const vandenkerckhove = Math.sqrt(gamma) * (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1)))
    const expected = Math.sqrt((R * 2226) / molarMass) / vandenkerckhove
    expectClose(result.characteristicVelocity, expected, 0.01, 'c*')
    // And exactly the formula on the library's own T, M and γ.
    const own = Math.sqrt((R * result.temperature) / result.molarMass) / vandenkerckhove
    expectClose(result.characteristicVelocity, own, 1e-12, 'c* formula')
  })
})

describe('mixture ratio', () => {
  it('stoichiometric air-to-fuel mass ratios: CH4 17.1, C3H8 15.6 (Turns, from memory), H2 34.3 (common practice, no source), within 1 %', () => {
    expectClose(mixtureRatioFromEquivalenceRatio('methane', 1), 17.1, 0.01)
    expectClose(mixtureRatioFromEquivalenceRatio('propane', 1), 15.6, 0.01)
    expectClose(mixtureRatioFromEquivalenceRatio('hydrogen', 1), 34.3, 0.01)
  })

  it('the two helpers are inverses and the ratio scales as 1/φ', () => {
    for (const fuel of FUELS)
      for (const phi of [0.3, 0.5, 1, 1.37, 2.5, 4]) {
        const ratio = mixtureRatioFromEquivalenceRatio(fuel, phi)
        expectClose(equivalenceRatioFromMixtureRatio(fuel, ratio), phi, 1e-14)
        expectClose(ratio * phi, mixtureRatioFromEquivalenceRatio(fuel, 1), 1e-14)
      }
  })

  it('combustion reports the mixture ratio of its φ', () => {
    expectClose(
      combustion({ fuel: 'propane', equivalenceRatio: 0.8, pressure: ATM }).mixtureRatio,
      mixtureRatioFromEquivalenceRatio('propane', 0.8),
      1e-14,
    )
  })
})

describe('combustion: cache', () => {
  it('returns equal values from the cache and a fresh object each time', () => {
    clearCombustionCache()
    const input = { fuel: 'methane' as const, equivalenceRatio: 0.9, pressure: 3e5 }
    const first = combustion(input)
    first.moleFractions.N2 = -1
    first.temperature = 0
    const second = combustion(input)
    expect(second.temperature).toBeGreaterThan(1000)
    expect(second.moleFractions.N2).toBeGreaterThan(0.5)
    clearCombustionCache()
    expect(combustion(input)).toEqual(second)
  })
})

describe('combustion: bad input', () => {
  it('throws a RangeError naming the argument', () => {
    const ok = { fuel: 'methane' as Fuel, equivalenceRatio: 1, pressure: ATM }
    expectRangeError(() => combustion({ ...ok, fuel: 'butane' as Fuel }), 'fuel', 'butane')
    expectRangeError(() => combustion({ ...ok, equivalenceRatio: 0.39 }), 'equivalenceRatio', '0.4', '2.5')
    expectRangeError(() => combustion({ ...ok, equivalenceRatio: 2.51 }), 'equivalenceRatio')
    expectRangeError(() => combustion({ ...ok, equivalenceRatio: Number.NaN }), 'equivalenceRatio')
    expectRangeError(() => combustion({ ...ok, pressure: 0 }), 'pressure')
    expectRangeError(() => combustion({ ...ok, pressure: -1 }), 'pressure')
    expectRangeError(() => combustion({ ...ok, pressure: Infinity }), 'pressure')
    expectRangeError(() => combustion({ ...ok, reactantTemperature: 0 }), 'reactantTemperature')
    expectRangeError(() => combustion({ ...ok, reactantTemperature: Number.NaN }), 'reactantTemperature')
    expectRangeError(() => combustion({ ...ok, reactantTemperature: -300 }), 'reactantTemperature')
    expectRangeError(() => combustion({ ...ok, reactantTemperature: Infinity }), 'reactantTemperature')
    // Above 3000 K the flame would leave the species data's ranges.
    expectRangeError(() => combustion({ ...ok, reactantTemperature: 3001 }), 'reactantTemperature', '3000')
    expectRangeError(() => combustion(null as never), 'input')
    expectRangeError(() => mixtureRatioFromEquivalenceRatio('kerosene' as Fuel, 1), 'fuel')
    expectRangeError(() => mixtureRatioFromEquivalenceRatio('methane', 0), 'equivalenceRatio')
    expectRangeError(() => equivalenceRatioFromMixtureRatio('methane', -2), 'mixtureRatio')
    expectRangeError(() => equivalenceRatioFromMixtureRatio('methane', Number.NaN), 'mixtureRatio')
  })

  it('accepts the ends of the φ range and reactants up to 3000 K', () => {
    expect(
      combustion({ fuel: 'methane', equivalenceRatio: 1, pressure: ATM, reactantTemperature: 3000 }).temperature,
    ).toBeGreaterThan(3000)
    expect(combustion({ fuel: 'hydrogen', equivalenceRatio: 0.4, pressure: ATM }).temperature).toBeGreaterThan(1000)
    expect(combustion({ fuel: 'hydrogen', equivalenceRatio: 2.5, pressure: ATM }).temperature).toBeGreaterThan(1000)
  })
})
