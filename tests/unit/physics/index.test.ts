import { describe, expect, it } from 'vitest'
import * as physics from '../../../shared/physics/index'

describe('the formula library barrel', () => {
  it('exports every name of the public contract', () => {
    const functions = [
      'isentropic',
      'machFromAreaRatio',
      'machFromPressureRatio',
      'normalShock',
      'prandtlMeyer',
      'machFromPrandtlMeyer',
      'obliqueShock',
      'nozzleFlow',
      'nozzlePressureRatios',
      'machDiskDistance',
      'fullyExpandedJet',
      'shockCellSpacing',
      'tankBlowdown',
      'totalImpulse',
      'specificImpulse',
      'characteristicVelocity',
      'thrustCoefficient',
      'idealThrust',
      'criticalPressureRatio',
      'chokedMassFlow',
      'meanValue',
      'peakValue',
      'areaFromDiameter',
      'reduceThrustRun',
      'tareAlongRun',
      'windowMean',
      'windowIntegral',
      'idealExhaustVelocity',
      'idealSpecificImpulse',
    ]
    const exported = physics as Record<string, unknown>
    for (const name of functions) expect(typeof exported[name], name).toBe('function')
    expect(physics.G0).toBe(9.80665)
  })

  it('throws RangeErrors with the argument name and allowed range, in one format', () => {
    expect(() => physics.isentropic(2, 1)).toThrowError(
      new RangeError('gamma must be a finite number greater than 1 (got 1)'),
    )
    expect(() => physics.normalShock(0.5, 1.4)).toThrowError(
      new RangeError('mach1 must be a finite number of at least 1 (got 0.5)'),
    )
  })
})
