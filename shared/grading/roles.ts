/**
 * Which columns and measurements of an assignment the built-in data checks read, found by their
 * `role` (see COLUMN_ROLES and MEASUREMENT_ROLES in shared/modules/schema.ts).
 */
import type { Assignment, TableSpec } from '../modules/schema'

/** Keys of the role-bearing columns and measurements; each is absent when the module does not declare it. */
export interface RoleKeys {
  /** The table that holds the thrust and pressure columns (or the first table with a time column). */
  table?: TableSpec
  time?: string
  thrust?: string
  chamberPressure?: string
  receiverPressure?: string
  ambientPressure?: string
  throatDiameter?: string
  exitDiameter?: string
  receiverVolume?: string
}

/**
 * The role-bearing keys of an assignment.
 *
 * @example
 * roleKeys(coldFlow) // { table: run, time: 't', thrust: 'thrust', chamberPressure: 'p_chamber', … }
 */
export function roleKeys(assignment: Assignment): RoleKeys {
  const keys: RoleKeys = {}
  const logTable =
    assignment.tables.find((t) => t.columns.some((c) => c.role !== undefined && c.role !== 'time')) ??
    assignment.tables.find((t) => t.columns.some((c) => c.role === 'time'))
  if (logTable) {
    keys.table = logTable
    for (const c of logTable.columns) {
      if (c.role === 'time') keys.time = c.key
      else if (c.role === 'thrust') keys.thrust = c.key
      else if (c.role === 'chamber-pressure') keys.chamberPressure = c.key
      else if (c.role === 'receiver-pressure') keys.receiverPressure = c.key
    }
  }
  for (const m of assignment.measurements) {
    if (m.role === 'ambient-pressure') keys.ambientPressure = m.key
    else if (m.role === 'throat-diameter') keys.throatDiameter = m.key
    else if (m.role === 'exit-diameter') keys.exitDiameter = m.key
    else if (m.role === 'receiver-volume') keys.receiverVolume = m.key
  }
  return keys
}
