import { describe, expect, it } from 'vitest'
import { renderJetPhoto, truthMarks } from '../../scripts/demo/jet-photo'
import { measureJet } from '../../shared/images/jet-marks'
import { fullyExpandedJet, machDiskDistance, shockCellSpacing } from '../../shared/physics'
import { expectClose } from '../helpers/expect-close'

// The demo's invented picture of a jet: what it draws must agree with the model it is drawn from.
const jet = fullyExpandedJet(0.005, 4.2e5, 98.6e3, 1.4)
const input = {
  exitDiameter: 0.008,
  jetDiameter: jet.diameter,
  cellSpacing: shockCellSpacing(jet.diameter, jet.mach),
  cells: 4,
  machDisk: machDiskDistance(0.008, 4.2e5, 98.6e3),
  width: 480,
  height: 240,
  pixelsPerMetre: 5000,
  seed: 7,
}

describe('renderJetPhoto (demo pictures)', () => {
  const photo = renderJetPhoto(input)

  it('puts the marks where the model says, so the true marks measure the model’s spacing', () => {
    const m = measureJet(truthMarks(photo, 8))
    expectClose(m.meanCellSpacing, input.cellSpacing, 2e-3)
    expectClose(m.machDiskDistance, input.machDisk, 2e-3)
    expect(m.cellSpacings).toHaveLength(4)
  })

  it('draws the shocks darker than the open background, and the same picture for the same seed', () => {
    const at = (p: { x: number; y: number }) => photo.pixels[Math.round(p.y) * photo.width + Math.round(p.x)]!
    const background = at({ x: photo.width - 5, y: 10 })
    const darkestNear = (c: { x: number; y: number }, rx: number, ry: number) => {
      let darkest = 255
      for (let dy = -ry; dy <= ry; dy++) {
        for (let dx = -rx; dx <= rx; dx++) darkest = Math.min(darkest, at({ x: c.x + dx, y: c.y + dy }))
      }
      return darkest
    }
    expect(darkestNear(photo.truth.machDisk!, 1, 1)).toBeLessThan(background - 30)
    // The first cell's shocks meet near the axis half-way along the cell.
    const midX = photo.truth.exitPlane.x + (input.cellSpacing * input.pixelsPerMetre) / 2
    expect(darkestNear({ x: midX, y: photo.height / 2 }, 2, 4)).toBeLessThan(background - 30)
    // Half-way between the nozzle and the first shock, off the lines, the picture is open background.
    expect(Math.abs(at({ x: photo.truth.exitPlane.x + 4, y: photo.height / 2 }) - background)).toBeLessThan(40)
    expect(renderJetPhoto(input).pixels).toEqual(photo.pixels)
    expect(renderJetPhoto({ ...input, seed: 8 }).pixels).not.toEqual(photo.pixels)
  })
})
