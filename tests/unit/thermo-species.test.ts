import { describe, expect, it } from 'vitest'
import {
  SPECIES,
  cpOverR,
  enthalpyOverRT,
  entropyOverR,
  mixtureCpOverR,
  mixtureEnthalpyOverRT,
  mixtureEntropyOverR,
} from '../../shared/thermo'
import type { SpeciesName } from '../../shared/thermo'
import { expectRangeError } from '../helpers/expect-range-error'

/** R̄, J/(mol·K) (2019 SI, exact). */
const R = 8.314462618

/** Values of one species at one temperature: cp J/(mol·K), h kJ/mol (with Δhf at 298.15 K), s° J/(mol·K) at 1 bar. */
interface Reference {
  cp: number
  h: number
  s: number
}

function ours(name: SpeciesName, t: number): Reference {
  return { cp: cpOverR(name, t) * R, h: (enthalpyOverRT(name, t) * R * t) / 1000, s: entropyOverR(name, t) * R }
}

const TIGHT = { cp: 0.005, h: 1, s: 0.2 }

/**
 * Tolerances: cp 0.5 %, h 1 kJ/mol, s 0.2 J/(mol·K). The GRI-Mech 3.0 fits are older than the
 * reference tables: its N2 entry (tagged 121286) is on the 1-atm standard state (s about 0.1 J/(mol·K)
 * low), and its OH and C3H8 heats of formation differ from the newer tables by about 0.4 and 0.9 kJ/mol.
 */
function expectMatches(name: SpeciesName, t: number, reference: Reference, tolerance = TIGHT): void {
  const value = ours(name, t)
  const cpError = Math.abs(value.cp - reference.cp) / reference.cp
  expect(cpError, `${name} cp at ${t} K: ${value.cp}`).toBeLessThan(tolerance.cp)
  expect(Math.abs(value.h - reference.h), `${name} h at ${t} K: ${value.h} kJ/mol`).toBeLessThan(tolerance.h)
  expect(Math.abs(value.s - reference.s), `${name} s at ${t} K: ${value.s}`).toBeLessThan(tolerance.s)
}

/**
 * NASA Glenn 9-coefficient fits, McBride, Zehe & Gordon, NASA/TP-2002-211556 (the thermo.inp data file
 * of NASA's CEA program; 1-bar standard state, h absolute with Δhf(298.15 K)). Per range: a1…a7, b1, b2.
 * Read from public copies of that file: CO2, H2O, N2, O2 from MIT-LAE/IdealGases.jl `thermo.inp`;
 * H2 and CH4 from a pinned copy of nasa/cea `data/thermo.inp` (v3.3.3); CO from the ThermoBuild example
 * printed in Cantera's documentation; O, OH, N, NO, H as noted below. C3H8 has no Glenn entry here:
 * it is checked at 298.15 K only (below), being a reactant. These fits were made independently of
 * GRI-Mech's, from the Gurvich and Cox tables.
 */
const GLENN: Partial<Record<SpeciesName, { low: number[]; high: number[] }>> = {
  CO2: {
    low: [
      4.94365054e4, -6.26411601e2, 5.30172524, 2.503813816e-3, -2.127308728e-7, -7.68998878e-10, 2.849677801e-13,
      -4.52819846e4, -7.04827944,
    ],
    high: [
      1.176962419e5, -1.788791477e3, 8.29152319, -9.22315678e-5, 4.86367688e-9, -1.891053312e-12, 6.33003659e-16,
      -3.90835059e4, -2.652669281e1,
    ],
  },
  H2O: {
    low: [
      -3.94796083e4, 5.75573102e2, 9.31782653e-1, 7.22271286e-3, -7.34255737e-6, 4.95504349e-9, -1.336933246e-12,
      -3.30397431e4, 1.724205775e1,
    ],
    high: [
      1.034972096e6, -2.412698562e3, 4.64611078, 2.291998307e-3, -6.83683048e-7, 9.42646893e-11, -4.82238053e-15,
      -1.384286509e4, -7.97814851,
    ],
  },
  N2: {
    low: [
      2.210371497e4, -3.81846182e2, 6.08273836, -8.53091441e-3, 1.384646189e-5, -9.62579362e-9, 2.519705809e-12,
      7.10846086e2, -1.076003744e1,
    ],
    high: [
      5.87712406e5, -2.239249073e3, 6.06694922, -6.1396855e-4, 1.491806679e-7, -1.923105485e-11, 1.061954386e-15,
      1.283210415e4, -1.586640027e1,
    ],
  },
  O2: {
    low: [
      -3.42556342e4, 4.84700097e2, 1.119010961, 4.29388924e-3, -6.83630052e-7, -2.0233727e-9, 1.039040018e-12,
      -3.39145487e3, 1.84969947e1,
    ],
    high: [
      -1.037939022e6, 2.344830282e3, 1.819732036, 1.267847582e-3, -2.188067988e-7, 2.053719572e-11, -8.19346705e-16,
      -1.689010929e4, 1.738716506e1,
    ],
  },
  H2: {
    low: [
      4.07832321e4, -8.00918604e2, 8.21470201, -1.269714457e-2, 1.753605076e-5, -1.20286027e-8, 3.36809349e-12,
      2.682484665e3, -3.043788844e1,
    ],
    high: [
      5.60812801e5, -8.37150474e2, 2.975364532, 1.252249124e-3, -3.74071619e-7, 5.9366252e-11, -3.6069941e-15,
      5.33982441e3, -2.202774769,
    ],
  },
  CH4: {
    low: [
      -1.766850998e5, 2.78618102e3, -1.20257785e1, 3.91761929e-2, -3.61905443e-5, 2.026853043e-8, -4.97670549e-12,
      -2.33131436e4, 8.90432275e1,
    ],
    high: [
      3.73004276e6, -1.383501485e4, 2.049107091e1, -1.961974759e-3, 4.72731304e-7, -3.72881469e-11, 1.623737207e-15,
      7.53206691e4, -1.219124889e2,
    ],
  },
  // O, OH, N, NO, H: the NASA-9 entries ("Converted from NASA 9-coefficient format", 8 significant
  // figures) in alongd/RMG-database, input/thermo/libraries/plasma.py.
  O: {
    low: [
      -7953.6113, 160.71778, 1.9662264, 0.0010136703, -1.1104154e-6, 6.5175075e-10, -1.5847793e-13, 28403.624,
      8.4042418,
    ],
    high: [
      261902.03, -729.8722, 3.3171773, -0.00042813344, 1.0361046e-7, -9.4383043e-12, 2.7250383e-16, 33924.281,
      -0.66795854,
    ],
  },
  OH: {
    low: [
      -1998.859, 93.001362, 3.0508542, 0.0015295293, -3.157891e-6, 3.3154462e-9, -1.1387627e-12, 3239.6835, 4.6741108,
    ],
    high: [
      1017393.4, -2509.9573, 5.1165479, 0.00013052999, -8.2843223e-8, 2.0064759e-11, -1.5569937e-15, 20444.871,
      -11.012823,
    ],
  },
  N: {
    low: [0, 0, 2.5, 0, 0, 0, 0, 56104.638, 4.1939093],
    high: [
      88765.014, -107.12315, 2.3621883, 0.00029167201, -1.7295151e-7, 4.0126579e-11, -2.6772276e-15, 56973.513,
      4.8652358,
    ],
  },
  NO: {
    low: [
      -11439.165, 153.64676, 3.4314687, -0.0026685924, 8.4813991e-6, -7.6851111e-9, 2.3867977e-12, 9098.2144, 6.7287275,
    ],
    high: [
      223901.87, -1289.6516, 5.433936, -0.00036560349, 9.8809664e-8, -1.4160769e-11, 9.3801846e-16, 17503.177,
      -8.5016671,
    ],
  },
  H: {
    low: [0, 0, 2.5, 0, 0, 0, 0, 25473.708, -0.44668285],
    high: [
      60.787743, -0.18193544, 2.5002118, -1.2265129e-7, 3.7328763e-11, -5.6877446e-15, 3.4102102e-19, 25474.864,
      -0.44819178,
    ],
  },
  CO: {
    low: [
      1.489045326e4, -2.922285939e2, 5.72452717, -8.17623503e-3, 1.456903469e-5, -1.087746302e-8, 3.027941827e-12,
      -1.303131878e4, -7.85924135,
    ],
    high: [
      4.61919725e5, -1.944704863e3, 5.91671418, -5.66428283e-4, 1.39881454e-7, -1.787680361e-11, 9.62093557e-16,
      -2.466261084e3, -1.387413108e1,
    ],
  },
}

/** The NASA-9 equations, TP-2002-211556 eq. 1–3 (written out here, independently of the library's 7-term form). */
function glenn(name: SpeciesName, t: number): Reference {
  const entry = GLENN[name]!
  const [a1, a2, a3, a4, a5, a6, a7, b1, b2] = (t <= 1000 ? entry.low : entry.high) as [
    number,
    number,
    number,
    number,
    number,
    number,
    number,
    number,
    number,
  ]
  const cp = a1 / t ** 2 + a2 / t + a3 + a4 * t + a5 * t ** 2 + a6 * t ** 3 + a7 * t ** 4
  const h =
    -a1 / t ** 2 +
    (a2 * Math.log(t)) / t +
    a3 +
    (a4 * t) / 2 +
    (a5 * t ** 2) / 3 +
    (a6 * t ** 3) / 4 +
    (a7 * t ** 4) / 5 +
    b1 / t
  const s =
    -a1 / (2 * t ** 2) -
    a2 / t +
    a3 * Math.log(t) +
    a4 * t +
    (a5 * t ** 2) / 2 +
    (a6 * t ** 3) / 3 +
    (a7 * t ** 4) / 4 +
    b2
  return { cp: cp * R, h: (h * R * t) / 1000, s: s * R }
}

describe('species properties against NASA Glenn (McBride, Zehe & Gordon 2002)', () => {
  for (const name of Object.keys(GLENN) as SpeciesName[]) {
    it(`${name}: cp, h and s at 298.15 K and 2000 K`, () => {
      expectMatches(name, 298.15, glenn(name, 298.15))
      // GRI-Mech's CH4 fit (1988) gives cp about 1 % and s about 0.35 J/(mol·K) under the 1991 Gurvich
      // tables behind the Glenn fit at 2000 K; methane only enters as a reactant near room temperature
      // (it is not a product species here), so CH4 at 2000 K gets cp 1.2 % and s 0.5 J/(mol·K).
      expectMatches(name, 2000, glenn(name, 2000), name === 'CH4' ? { cp: 0.012, h: 1, s: 0.5 } : TIGHT)
    })
  }

  it('the NASA Glenn heats of formation printed in thermo.inp (CO2 −393.510, H2O −241.826, CH4 −74.600, CO −110.535 kJ/mol)', () => {
    // These are the Δhf(298.15 K) fields of each entry's second line (the tables' values, not the fit).
    const printed: [SpeciesName, number][] = [
      ['CO2', -393.51],
      ['H2O', -241.826],
      ['CH4', -74.6],
      ['CO', -110.535196],
    ]
    for (const [name, hf] of printed) expect(Math.abs(ours(name, 298.15).h - hf), name).toBeLessThan(0.05)
  })
})

describe('species properties against the NIST-JANAF tables (Chase 1998, 1 bar), from memory', () => {
  // 298.15 K: cp J/(mol·K), Δhf kJ/mol, s° J/(mol·K), NIST-JANAF 4th ed. (from memory); C3H8 from the
  // TRC tables as quoted in the NIST Chemistry WebBook (from memory).
  const janaf298: [SpeciesName, Reference][] = [
    ['H', { cp: 20.786, h: 217.999, s: 114.716 }],
    ['O', { cp: 21.912, h: 249.173, s: 161.059 }],
    ['N', { cp: 20.786, h: 472.683, s: 153.301 }],
    ['OH', { cp: 29.986, h: 38.987, s: 183.745 }],
    ['NO', { cp: 29.845, h: 91.271, s: 210.758 }],
    ['C3H8', { cp: 73.6, h: -104.7, s: 270.3 }],
  ]
  for (const [name, reference] of janaf298) {
    it(`${name} at 298.15 K`, () => expectMatches(name, 298.15, reference))
  }

  it('H and N at 2000 K follow the monatomic ideal gas (cp = 5/2 R; kinetic theory, no electronic states low enough to count)', () => {
    for (const [name, at298] of janaf298.slice(0, 3).filter(([n]) => n !== 'O')) {
      const cp = 2.5 * R
      const reference = {
        cp,
        h: at298.h + (cp * (2000 - 298.15)) / 1000,
        s: at298.s + cp * Math.log(2000 / 298.15),
      }
      expectMatches(name, 2000, reference)
    }
  })
})

describe('species data file', () => {
  it('every species is continuous at its common temperature (a check on the transcription of the two ranges)', () => {
    for (const [name, species] of Object.entries(SPECIES)) {
      const tm = species.temperatureRange.common
      const below = ours(name as SpeciesName, tm)
      const above = ours(name as SpeciesName, tm + 1e-9)
      expect(Math.abs(below.cp - above.cp) / below.cp, `${name} cp`).toBeLessThan(2e-3)
      expect(Math.abs(below.h - above.h), `${name} h`).toBeLessThan(0.05)
      expect(Math.abs(below.s - above.s), `${name} s`).toBeLessThan(0.05)
    }
  })

  it('molar masses are the sums of the IUPAC atomic weights (C 12.011, H 1.008, N 14.007, O 15.999 g/mol, from memory)', () => {
    const weights: Record<string, number> = { C: 12.011, H: 1.008, N: 14.007, O: 15.999 }
    for (const species of Object.values(SPECIES)) {
      const sum = Object.entries(species.elements).reduce((total, [e, count]) => total + weights[e]! * (count ?? 0), 0)
      expect(Math.abs(species.molarMass * 1000 - sum), species.name).toBeLessThan(1e-9)
    }
  })
})

describe('mixture properties', () => {
  it('air (0.21 O2, 0.79 N2) at 298.15 K: cp ≈ 29.1 J/(mol·K), h = 0, s from ideal mixing (NASA RP-1311 eq. 2.17)', () => {
    const air = { O2: 0.21, N2: 0.79 }
    expect(Math.abs(mixtureCpOverR(air, 298.15) * R - (0.21 * 29.376 + 0.79 * 29.124))).toBeLessThan(0.15) // JANAF cp, from memory
    expect(Math.abs(mixtureEnthalpyOverRT(air, 298.15))).toBeLessThan(1e-3)
    const mixing = -(0.21 * Math.log(0.21) + 0.79 * Math.log(0.79))
    const pure = 0.21 * entropyOverR('O2', 298.15) + 0.79 * entropyOverR('N2', 298.15)
    expect(mixtureEntropyOverR(air, 298.15, 100000)).toBeCloseTo(pure + mixing, 12)
    // Ten times the pressure lowers s/R by ln 10.
    expect(mixtureEntropyOverR(air, 298.15, 1e6)).toBeCloseTo(pure + mixing - Math.log(10), 12)
  })

  it('refuses a non-positive or non-finite temperature or pressure and an unknown species, naming the argument', () => {
    expectRangeError(() => cpOverR('N2', 0), 'temperature')
    expectRangeError(() => enthalpyOverRT('N2', Number.NaN), 'temperature')
    expectRangeError(() => entropyOverR('N2', -1), 'temperature')
    expectRangeError(() => cpOverR('Xe' as SpeciesName, 300), 'species')
    expectRangeError(() => mixtureEntropyOverR({ N2: 1 }, 300, 0), 'pressure')
    expectRangeError(() => mixtureCpOverR({ N2: -1 }, 300), 'composition.N2')
  })
})
