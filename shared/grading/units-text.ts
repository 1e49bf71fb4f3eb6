/**
 * Reading units out of what people write in a CSV header or a units row: "thrust [N]", "pc (psi)",
 * "p_chamber_kPa", "psig", "sec". Used to suggest a column mapping and to recognise a row of units
 * under the header. The unit table itself (shared/units.ts) stays strict: these are only guesses a
 * person confirms in the mapping form.
 */
import { UNITS, isUnitSymbol, unitKind, type PressureSense } from '../units'
import type { UnitKind, UnitSymbol } from '../units'

/** A unit read from text, with the gauge/absolute sense when the text says it (psig, bar(a)). */
export interface UnitReading {
  unit: UnitSymbol
  pressure?: PressureSense
}

// Spellings seen in logger exports, lower-case, with the unit they mean.
const ALIASES: Readonly<Record<string, UnitSymbol>> = {
  sec: 's',
  secs: 's',
  second: 's',
  seconds: 's',
  msec: 'ms',
  millisecond: 'ms',
  milliseconds: 'ms',
  newton: 'N',
  newtons: 'N',
  kilonewton: 'kN',
  kilonewtons: 'kN',
  pascal: 'Pa',
  pascals: 'Pa',
  kilopascal: 'kPa',
  kilopascals: 'kPa',
  megapascal: 'MPa',
  megapascals: 'MPa',
  millimetre: 'mm',
  millimeter: 'mm',
  millimetres: 'mm',
  millimeters: 'mm',
  inch: 'in',
  inches: 'in',
  l: 'L',
  litre: 'L',
  liter: 'L',
  litres: 'L',
  liters: 'L',
  '°c': 'degC',
  degc: 'degC',
  celsius: 'degC',
  '°f': 'degF',
  degf: 'degF',
  fahrenheit: 'degF',
  kelvin: 'K',
  lbs: 'lb',
  gram: 'g',
  grams: 'g',
  kilogram: 'kg',
  kilograms: 'kg',
}

const LOWER_SYMBOLS = new Map<string, UnitSymbol>()
for (const symbol of Object.keys(UNITS) as UnitSymbol[]) {
  // 'm' (metre) and 'M…' never collide in the table, so a case-insensitive lookup is unambiguous.
  if (!LOWER_SYMBOLS.has(symbol.toLowerCase())) LOWER_SYMBOLS.set(symbol.toLowerCase(), symbol)
}

/**
 * The unit a piece of text names, if any: a symbol of the unit table (exact, then ignoring case),
 * a common spelling (sec, newtons, litre, °C), or a pressure with a gauge/absolute mark (psig,
 * psia, barg, bar(g), kPa(a), kPa gauge).
 *
 * @param text - e.g. "kPa", "psig", "bar (g)", "[N]"
 * @param kind - the kind the column holds, when known: in a force column a mass unit means the
 *   force of that mass under standard gravity, as load cells are labelled ("kg" → kgf, "g" → gf,
 *   "lb"/"lbs" → lbf); elsewhere they stay masses
 * @returns the unit and sense, or undefined when the text is not a unit
 * @example
 * readUnit('psig')       // { unit: 'psi', pressure: 'gauge' }
 * readUnit('lbs', 'force') // { unit: 'lbf' }
 * readUnit('g', 'force')   // { unit: 'gf' }
 */
export function readUnit(text: string, kind?: UnitKind | 'dimensionless'): UnitReading | undefined {
  let t = text.trim()
  const wrapped = /^[[(]\s*(.*?)\s*[\])]$/.exec(t)
  if (wrapped && wrapped[1] !== undefined) t = wrapped[1]
  if (t === '') return undefined
  let pressure: PressureSense | undefined
  // "kPa(g)", "kPa (a)", "kPa g", "bar gauge", "psi abs"
  const sense = /^(.*?)(?:\s*\(\s*([ga])\s*\)|[\s_-]+([ga])|[\s_-]+(gauge|absolute|abs))$/i.exec(t)
  if (sense && sense[1]) {
    const mark = (sense[2] ?? sense[3] ?? sense[4] ?? '').toLowerCase()
    pressure = mark === 'g' || mark === 'gauge' ? 'gauge' : 'absolute'
    t = sense[1].trim()
  }
  let unit = lookup(t, kind)
  if (!unit && pressure === undefined && /^(psi|bar|kpa|mpa)[ga]$/i.test(t)) {
    // psig, psia, barg, bara, kPag, kPaa
    pressure = t.slice(-1).toLowerCase() === 'g' ? 'gauge' : 'absolute'
    unit = lookup(t.slice(0, -1), kind)
  }
  if (!unit) return undefined
  if (pressure !== undefined && unitKind(unit) !== 'pressure') return undefined
  return pressure === undefined ? { unit } : { unit, pressure }
}

function lookup(text: string, kind?: UnitKind | 'dimensionless'): UnitSymbol | undefined {
  const compact = text.replace(/\s+/g, '')
  if (isUnitSymbol(compact)) return adjustForKind(compact, kind)
  const lower = compact.toLowerCase()
  const found = LOWER_SYMBOLS.get(lower) ?? ALIASES[lower]
  return found === undefined ? undefined : adjustForKind(found, kind)
}

/**
 * A load cell labelled in a mass unit reads the weight of that mass under standard gravity: a
 * thrust logged in "kg", "g" or "lb" is kilogram-, gram- or pound-force. Suggesting newtons for
 * such a column would hide a factor of 9.81 (or 4.45), so the force unit is proposed instead.
 */
const FORCE_OF_MASS: Readonly<Partial<Record<UnitSymbol, UnitSymbol>>> = { kg: 'kgf', g: 'gf', lb: 'lbf' }

function adjustForKind(unit: UnitSymbol, kind?: UnitKind | 'dimensionless'): UnitSymbol {
  if (kind === 'force') return FORCE_OF_MASS[unit] ?? unit
  return unit
}

/** A header split into the column's name and the unit it states, if any. */
export interface HeaderReading {
  /** The header without its unit, trimmed. */
  name: string
  unit?: UnitReading
}

/**
 * Splits a header into a name and a unit: "thrust [N]", "pc (psi)", "Chamber pressure (kPa g)",
 * "p_chamber_kPa", "time s". A header whose last word is not a unit is all name.
 *
 * @example
 * readHeader('pc (psig)')     // { name: 'pc', unit: { unit: 'psi', pressure: 'gauge' } }
 * readHeader('p_chamber_kPa') // { name: 'p_chamber', unit: { unit: 'kPa' } }
 * readHeader('p_chamber')     // { name: 'p_chamber' }
 */
export function readHeader(header: string, kind?: UnitKind | 'dimensionless'): HeaderReading {
  const h = header.trim()
  const bracketed = /^(.*?)\s*[[(]\s*([^\])]*?)\s*[\])]\s*$/.exec(h)
  if (bracketed && bracketed[1] !== undefined && bracketed[2] !== undefined) {
    const unit = readUnit(bracketed[2], kind)
    if (unit) return { name: bracketed[1].trim(), unit }
  }
  const suffixed = /^(.+?)[\s_]+([^\s_]+(?:[\s_]*\(\s*[ga]\s*\))?)$/i.exec(h)
  if (suffixed && suffixed[1] !== undefined && suffixed[2] !== undefined) {
    const unit = readUnit(suffixed[2], kind)
    if (unit) return { name: suffixed[1].trim(), unit }
  }
  return { name: h }
}
