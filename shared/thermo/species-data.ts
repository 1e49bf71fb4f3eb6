/**
 * Thermodynamic data of the species the combustion library uses: NASA 7-coefficient polynomials.
 *
 * Source of every coefficient: GRI-Mech 3.0, thermodynamic data file `thermo30.dat` (G. P. Smith,
 * D. M. Golden, M. Frenklach et al., GRI-Mech 3.0, http://combustion.berkeley.edu/gri-mech/, 1999).
 * Read from the copy of that file stored in the public repository `abbelod/gibbs-minimization-ga`,
 * path `thermo30.dat` (commit f3ab55cb468c096b070d9785f701d72e7f52b0f1). Only the numbers were
 * taken; the header line of each entry gives the fit's date/origin tag (kept as `fitDate`) and the
 * temperature ranges.
 *
 * The polynomial form (NASA 7-coefficient, Gordon & McBride, NASA RP-1311, 1994, eq. 4.9–4.11 and
 * McBride, Zehe & Gordon, NASA/TP-2002-211556, §2):
 *   cp/R = a1 + a2 T + a3 T² + a4 T³ + a5 T⁴
 *   h/RT = a1 + a2 T/2 + a3 T²/3 + a4 T³/4 + a5 T⁴/5 + a6/T
 *   s/R  = a1 ln T + a2 T + a3 T²/2 + a4 T³/3 + a5 T⁴/4 + a7
 * `low` applies from `temperatureRange.low` to `common` (1000 K for every species here), `high` from
 * `common` to `temperatureRange.high`. h includes the heat of formation at 298.15 K (h = 0 for the
 * elements in their reference state: H2, O2, N2).
 *
 * Reference pressure: the GRI-Mech fits use the tables they were made from; all but N2 (an older
 * CHEMKIN fit, tagged 121286, whose entropy is about 0.1 J/(mol·K) under the 1-bar table value)
 * reproduce the 1-bar (0.1 MPa) tables. The library treats them all as 1 bar (see README.md).
 *
 * Molar masses are from the element composition and the IUPAC conventional atomic weights
 * C 12.011, H 1.008, N 14.007, O 15.999 g/mol (from memory).
 */

/** The chemical elements of air and of the three fuels. Argon is left out: air is O2 + 3.76 N2. */
export type Element = 'C' | 'H' | 'O' | 'N'

/** The elements in the order the equilibrium solver numbers them. */
export const ELEMENTS: readonly Element[] = ['C', 'H', 'O', 'N']

/** IUPAC conventional atomic weights, kg/mol (from memory). */
export const ATOMIC_WEIGHT: Readonly<Record<Element, number>> = { C: 0.012011, H: 0.001008, O: 0.015999, N: 0.014007 }

/** Seven NASA polynomial coefficients a1…a7 for one temperature range. */
export type NasaCoefficients = readonly [number, number, number, number, number, number, number]

/** One species' data. */
export interface SpeciesData {
  /** Formula as written in the source file. */
  name: string
  /** Atoms of each element in one molecule. */
  elements: Readonly<Partial<Record<Element, number>>>
  /** kg/mol. */
  molarMass: number
  /** K: the fit is valid from `low` to `high`; `common` splits the two coefficient sets. */
  temperatureRange: Readonly<{ low: number; common: number; high: number }>
  /** Coefficients for low ≤ T ≤ common. */
  low: NasaCoefficients
  /** Coefficients for common < T ≤ high. */
  high: NasaCoefficients
  /** The date/origin tag of the fit in the source file's header line. */
  fitDate: string
}

/** Names of the species with data here. */
export type SpeciesName = 'N2' | 'O2' | 'CO2' | 'H2O' | 'CO' | 'H2' | 'OH' | 'H' | 'O' | 'NO' | 'N' | 'CH4' | 'C3H8'

/** GRI-Mech 3.0 thermo30.dat, see the header of this file. */
export const SPECIES: Readonly<Record<SpeciesName, SpeciesData>> = {
  N2: {
    name: 'N2',
    elements: { N: 2 },
    molarMass: 0.028014,
    temperatureRange: { low: 300, common: 1000, high: 5000 },
    low: [3.298677, 0.0014082404, -3.963222e-6, 5.641515e-9, -2.444854e-12, -1020.8999, 3.950372],
    high: [2.92664, 0.0014879768, -5.68476e-7, 1.0097038e-10, -6.753351e-15, -922.7977, 5.980528],
    fitDate: '121286',
  },
  O2: {
    name: 'O2',
    elements: { O: 2 },
    molarMass: 0.031998,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [3.78245636, -0.00299673416, 9.84730201e-6, -9.68129509e-9, 3.24372837e-12, -1063.94356, 3.65767573],
    high: [3.28253784, 0.00148308754, -7.57966669e-7, 2.09470555e-10, -2.16717794e-14, -1088.45772, 5.45323129],
    fitDate: 'TPIS89',
  },
  CO2: {
    name: 'CO2',
    elements: { C: 1, O: 2 },
    molarMass: 0.044009,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [2.35677352, 0.00898459677, -7.12356269e-6, 2.45919022e-9, -1.43699548e-13, -48371.9697, 9.90105222],
    high: [3.85746029, 0.00441437026, -2.21481404e-6, 5.23490188e-10, -4.72084164e-14, -48759.166, 2.27163806],
    fitDate: 'L 7/88',
  },
  H2O: {
    name: 'H2O',
    elements: { H: 2, O: 1 },
    molarMass: 0.018015,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [4.19864056, -0.0020364341, 6.52040211e-6, -5.48797062e-9, 1.77197817e-12, -30293.7267, -0.849032208],
    high: [3.03399249, 0.00217691804, -1.64072518e-7, -9.7041987e-11, 1.68200992e-14, -30004.2971, 4.9667701],
    fitDate: 'L 8/89',
  },
  CO: {
    name: 'CO',
    elements: { C: 1, O: 1 },
    molarMass: 0.02801,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [3.57953347, -0.00061035368, 1.01681433e-6, 9.07005884e-10, -9.04424499e-13, -14344.086, 3.50840928],
    high: [2.71518561, 0.00206252743, -9.98825771e-7, 2.30053008e-10, -2.03647716e-14, -14151.8724, 7.81868772],
    fitDate: 'TPIS79',
  },
  H2: {
    name: 'H2',
    elements: { H: 2 },
    molarMass: 0.002016,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [2.34433112, 0.00798052075, -1.9478151e-5, 2.01572094e-8, -7.37611761e-12, -917.935173, 0.683010238],
    high: [3.3372792, -4.94024731e-5, 4.99456778e-7, -1.79566394e-10, 2.00255376e-14, -950.158922, -3.20502331],
    fitDate: 'TPIS78',
  },
  OH: {
    name: 'OH',
    elements: { O: 1, H: 1 },
    molarMass: 0.017007,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [3.99201543, -0.00240131752, 4.61793841e-6, -3.88113333e-9, 1.3641147e-12, 3615.08056, -0.103925458],
    high: [3.09288767, 0.000548429716, 1.26505228e-7, -8.79461556e-11, 1.17412376e-14, 3858.657, 4.4766961],
    fitDate: 'RUS 78',
  },
  H: {
    name: 'H',
    elements: { H: 1 },
    molarMass: 0.001008,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [2.5, 7.05332819e-13, -1.99591964e-15, 2.30081632e-18, -9.27732332e-22, 25473.6599, -0.446682853],
    high: [2.50000001, -2.30842973e-11, 1.61561948e-14, -4.73515235e-18, 4.98197357e-22, 25473.6599, -0.446682914],
    fitDate: 'L 7/88',
  },
  O: {
    name: 'O',
    elements: { O: 1 },
    molarMass: 0.015999,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [3.1682671, -0.00327931884, 6.64306396e-6, -6.12806624e-9, 2.11265971e-12, 29122.2592, 2.05193346],
    high: [2.56942078, -8.59741137e-5, 4.19484589e-8, -1.00177799e-11, 1.22833691e-15, 29217.5791, 4.78433864],
    fitDate: 'L 1/90',
  },
  NO: {
    name: 'NO',
    elements: { N: 1, O: 1 },
    molarMass: 0.030006,
    temperatureRange: { low: 200, common: 1000, high: 6000 },
    low: [4.2184763, -0.004638976, 1.1041022e-5, -9.3361354e-9, 2.803577e-12, 9844.623, 2.2808464],
    high: [3.2606056, 0.0011911043, -4.2917048e-7, 6.9457669e-11, -4.0336099e-15, 9920.9746, 6.3693027],
    fitDate: 'RUS 78',
  },
  N: {
    name: 'N',
    elements: { N: 1 },
    molarMass: 0.014007,
    temperatureRange: { low: 200, common: 1000, high: 6000 },
    low: [2.5, 0.0, 0.0, 0.0, 0.0, 56104.637, 4.1939087],
    high: [2.4159429, 0.00017489065, -1.1902369e-7, 3.0226245e-11, -2.0360982e-15, 56133.773, 4.6496096],
    fitDate: 'L 6/88',
  },
  CH4: {
    name: 'CH4',
    elements: { C: 1, H: 4 },
    molarMass: 0.016043,
    temperatureRange: { low: 200, common: 1000, high: 3500 },
    low: [5.14987613, -0.0136709788, 4.91800599e-5, -4.84743026e-8, 1.66693956e-11, -10246.6476, -4.64130376],
    high: [0.074851495, 0.0133909467, -5.73285809e-6, 1.22292535e-9, -1.0181523e-13, -9468.34459, 18.437318],
    fitDate: 'L 8/88',
  },
  C3H8: {
    name: 'C3H8',
    elements: { C: 3, H: 8 },
    molarMass: 0.044097,
    temperatureRange: { low: 300, common: 1000, high: 5000 },
    low: [0.93355381, 0.026424579, 6.1059727e-6, -2.1977499e-8, 9.5149253e-12, -13958.52, 19.201691],
    high: [7.5341368, 0.018872239, -6.2718491e-6, 9.1475649e-10, -4.7838069e-14, -16467.516, -17.892349],
    fitDate: 'L 4/85',
  },
}
