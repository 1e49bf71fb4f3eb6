/**
 * Geometry helpers for nozzle sizing.
 */
import { requirePositive } from './validate'

/**
 * Area of a circle from its diameter (throat or exit of a round nozzle).
 *
 * A = π·d²/4.
 *
 * Source: Euclidean geometry.
 *
 * @param diameter - diameter d, m, finite, > 0
 * @returns area, m²
 * @example
 * areaFromDiameter(0.004) // ≈ 1.2566e-5 m² (a 4 mm throat)
 */
export function areaFromDiameter(diameter: number): number {
  requirePositive('diameter', diameter)
  return (Math.PI * diameter * diameter) / 4
}

/**
 * Diameter of a circle from its area (inverse of {@link areaFromDiameter}).
 *
 * d = √(4A/π).
 *
 * Source: Euclidean geometry.
 *
 * @param area - area A, m², finite, > 0
 * @returns diameter, m
 * @example
 * diameterFromArea(1.2566370614359173e-5) // ≈ 0.004 m
 */
export function diameterFromArea(area: number): number {
  requirePositive('area', area)
  return Math.sqrt((4 * area) / Math.PI)
}
