import { describe, expect, it } from 'vitest'
import type { MarkRules } from '../../../shared/images/jet-marks'
import {
  deleteSelected,
  describeMark,
  draftFromMarks,
  draftMarks,
  markDistance,
  moveCursor,
  moveMark,
  newEditor,
  nextMode,
  nudgeSelected,
  placeMark,
  placedMarks,
  problemText,
  readout,
  selectMark,
  undo,
} from '../../../src/components/photo/mark-draft'
import type { MarkEditor, MarkMode } from '../../../src/components/photo/mark-draft'

// A 400 × 200 picture; the scale spans 40 px upright (8 mm: 0.2 mm per pixel), the exit plane sits
// at (50, 100) and the jet runs to the right along y = 100. Distances worked by hand below.
const image = { width: 400, height: 200 }
const rules: MarkRules = { cells: { min: 2, max: 3 }, machDisk: 'optional' }
const scale = { value: 8, unit: 'mm' }

function place(e: MarkEditor, mode: MarkMode, x: number, y: number, r: MarkRules = rules) {
  return placeMark(e, mode, { x, y }, image, { rules: r }).editor
}

function complete(): MarkEditor {
  let e = newEditor()
  e = place(e, 'scale', 100, 50)
  e = place(e, 'scale', 100, 90)
  e = place(e, 'exit-plane', 50, 100)
  e = place(e, 'cell-end', 110, 100)
  e = place(e, 'cell-end', 170, 100)
  e = place(e, 'mach-disk', 80, 100)
  return e
}

describe('placing marks', () => {
  it('the scale takes two points; a third click starts it again', () => {
    let e = place(newEditor(), 'scale', 10, 20)
    expect(e.draft.scale).toEqual([{ x: 10, y: 20 }, null])
    e = place(e, 'scale', 30, 20)
    expect(e.draft.scale).toEqual([
      { x: 10, y: 20 },
      { x: 30, y: 20 },
    ])
    expect(e.selected).toEqual({ kind: 'scale', end: 1 })
    e = place(e, 'scale', 5, 5)
    expect(e.draft.scale).toEqual([{ x: 5, y: 5 }, null])
  })

  it('the exit plane and the Mach disk are one each (a new one replaces the old); cell ends add up', () => {
    let e = place(newEditor(), 'exit-plane', 50, 100)
    e = place(e, 'exit-plane', 52, 101)
    expect(e.draft.exitPlane).toEqual({ x: 52, y: 101 })
    e = place(e, 'cell-end', 110, 100)
    e = place(e, 'cell-end', 170, 100)
    expect(e.draft.cellEnds).toEqual([
      { x: 110, y: 100 },
      { x: 170, y: 100 },
    ])
    expect(e.selected).toEqual({ kind: 'cell-end', index: 1 })
    e = place(e, 'mach-disk', 80, 100)
    e = place(e, 'mach-disk', 81, 100)
    expect(e.draft.machDisk).toEqual({ x: 81, y: 100 })
  })

  it('keeps a mark placed beyond the edge inside the picture', () => {
    const e = place(newEditor(), 'cell-end', 450, -12)
    expect(e.draft.cellEnds).toEqual([{ x: 400, y: 0 }])
  })

  it('refuses a cell end beyond the sheet’s most, and a Mach disk the sheet does not take', () => {
    let e = complete()
    e = place(e, 'cell-end', 230, 100)
    expect(e.draft.cellEnds).toHaveLength(3)
    const refused = placeMark(e, 'cell-end', { x: 290, y: 100 }, image, { rules })
    expect(refused.placed).toBeNull()
    expect(refused.editor).toBe(e)
    const none = placeMark(newEditor(), 'mach-disk', { x: 1, y: 1 }, image, {
      rules: { ...rules, machDisk: 'none' },
    })
    expect(none.placed).toBeNull()
  })

  it('a mark placed at the keyboard cross-hair need not be selected (the arrows keep moving the cross-hair)', () => {
    const r = placeMark(newEditor(), 'cell-end', { x: 5, y: 5 }, image, { rules, select: false })
    expect(r.placed).toEqual({ kind: 'cell-end', index: 0 })
    expect(r.editor.selected).toBeNull()
  })

  it('moves on to the exit plane once the scale is in, then to the cell ends', () => {
    let e = place(newEditor(), 'scale', 1, 1)
    expect(nextMode(e.draft, 'scale')).toBe('scale')
    e = place(e, 'scale', 1, 41)
    expect(nextMode(e.draft, 'scale')).toBe('exit-plane')
    e = place(e, 'exit-plane', 50, 100)
    expect(nextMode(e.draft, 'exit-plane')).toBe('cell-end')
    expect(nextMode(e.draft, 'cell-end')).toBe('cell-end')
  })
})

describe('selecting, moving, nudging, deleting and undoing', () => {
  it('an arrow key moves the selected mark by one image pixel, Shift by ten, never out of the picture', () => {
    let e = selectMark(complete(), { kind: 'cell-end', index: 0 })
    e = nudgeSelected(e, 1, 0, image)
    expect(e.draft.cellEnds[0]).toEqual({ x: 111, y: 100 })
    e = nudgeSelected(e, 0, -10, image)
    expect(e.draft.cellEnds[0]).toEqual({ x: 111, y: 90 })
    e = moveMark(e, { kind: 'cell-end', index: 0 }, { x: 399, y: 5 }, image)
    e = nudgeSelected(e, 10, -10, image)
    expect(e.draft.cellEnds[0]).toEqual({ x: 400, y: 0 })
  })

  it('nothing selected: a nudge and a delete change nothing', () => {
    const e = selectMark(complete(), null)
    expect(nudgeSelected(e, 1, 0, image)).toBe(e)
    expect(deleteSelected(e).removed).toBeNull()
  })

  it('the cross-hair moves by the same steps and stays inside the picture', () => {
    expect(moveCursor({ x: 200, y: 100 }, -10, 0, image)).toEqual({ x: 190, y: 100 })
    expect(moveCursor({ x: 395, y: 2 }, 10, -10, image)).toEqual({ x: 400, y: 0 })
  })

  it('deleting a cell end renumbers the later ones; undo brings it back', () => {
    let e = complete()
    e = selectMark(e, { kind: 'cell-end', index: 0 })
    const r = deleteSelected(e)
    expect(r.removed).toEqual({ kind: 'cell-end', index: 0 })
    expect(r.editor.draft.cellEnds).toEqual([{ x: 170, y: 100 }])
    expect(r.editor.selected).toBeNull()
    e = undo(r.editor)
    expect(e.draft.cellEnds).toEqual([
      { x: 110, y: 100 },
      { x: 170, y: 100 },
    ])
  })

  it('undo steps back one change at a time, a drag counting as one', () => {
    let e = complete()
    const before = e.draft
    const id = { kind: 'exit-plane' } as const
    e = moveMark(e, id, { x: 60, y: 100 }, image, { record: true })
    e = moveMark(e, id, { x: 70, y: 100 }, image, { record: false })
    e = moveMark(e, id, { x: 80, y: 100 }, image, { record: false })
    expect(e.draft.exitPlane).toEqual({ x: 80, y: 100 })
    e = undo(e)
    expect(e.draft).toEqual(before)
    e = undo(e)
    expect(e.draft.machDisk).toBeNull()
    let u = e
    for (let i = 0; i < 10; i++) u = undo(u)
    expect(placedMarks(u.draft)).toEqual([])
    expect(undo(u)).toBe(u)
  })

  it('stored marks come back as the same draft', () => {
    const { marks } = draftMarks(complete().draft, scale, image, rules)
    expect(draftFromMarks(marks!)).toEqual(complete().draft)
  })
})

describe('the draft as marks to send, with its problems in words', () => {
  it('names each missing mark', () => {
    const e = place(place(newEditor(), 'scale', 100, 50), 'cell-end', 110, 100)
    const { marks, problems } = draftMarks(e.draft, scale, image, { ...rules, machDisk: 'required' })
    expect(marks).toBeNull()
    expect(problems.map(problemText)).toEqual([
      'Scale: place the second scale point.',
      'Exit plane: mark the exit plane (the nozzle’s exit, on the axis).',
      'Cell ends: mark at least 2 cell ends (1 marked).',
      'Mach disk: mark the Mach disk (the flat shock across the jet in the first cell).',
    ])
  })

  it('asks for the scale length when it is missing or zero, and for a length unit', () => {
    const d = complete().draft
    expect(draftMarks(d, null, image, rules).problems.map((p) => p.mark)).toEqual(['scale'])
    expect(draftMarks(d, { value: 0, unit: 'mm' }, image, rules).marks).toBeNull()
    const kpa = draftMarks(d, { value: 8, unit: 'kPa' }, image, rules)
    expect(kpa.marks).toBeNull()
    expect(kpa.problems[0]!.message).toContain('the scale unit must be a length')
  })

  it('complete marks pass with no problem; a scale of zero length is named by the shared check', () => {
    const d = complete().draft
    const ok = draftMarks(d, scale, image, rules)
    expect(ok.problems).toEqual([])
    expect(ok.marks).toEqual({
      scale: { from: { x: 100, y: 50 }, to: { x: 100, y: 90 }, length: 8, unit: 'mm' },
      exitPlane: { x: 50, y: 100 },
      cellEnds: [
        { x: 110, y: 100 },
        { x: 170, y: 100 },
      ],
      machDisk: { x: 80, y: 100 },
    })
    const flat = draftMarks(
      {
        ...d,
        scale: [
          { x: 5, y: 5 },
          { x: 5, y: 5 },
        ],
      },
      scale,
      image,
      rules,
    )
    expect(flat.problems.map((p) => p.mark)).toEqual(['scale'])
    expect(flat.problems[0]!.message).toContain('same spot')
  })
})

describe('the readout', () => {
  // 0.2 mm per pixel: the cell ends 60 px and 120 px from the exit plane are 12 mm and 24 mm; the
  // Mach disk 30 px away is 6 mm; with an 8 mm exit diameter, 1.5 D, 3 D and 0.75 D.
  const marks = draftMarks(complete().draft, scale, image, rules).marks!

  it('gives each distance in metres and in exit diameters (the scale length by default)', () => {
    const r = readout(marks)
    expect(r.scalePixels).toBeCloseTo(40, 10)
    expect(r.cellEnds.map((x) => x.metres)).toEqual([expect.closeTo(0.012, 12), expect.closeTo(0.024, 12)])
    expect(r.cellEnds.map((x) => x.diameters)).toEqual([expect.closeTo(1.5, 10), expect.closeTo(3, 10)])
    expect(r.cells.map((x) => x.metres)).toEqual([expect.closeTo(0.012, 12), expect.closeTo(0.012, 12)])
    expect(r.meanSpacing!.metres).toBeCloseTo(0.012, 12)
    expect(r.meanSpacing!.diameters).toBeCloseTo(1.5, 10)
    expect(r.machDisk!.metres).toBeCloseTo(0.006, 12)
    expect(r.machDisk!.diameters).toBeCloseTo(0.75, 10)
  })

  it('divides by a given exit diameter when the scale is another length', () => {
    const r = readout(marks, 0.012)
    expect(r.meanSpacing!.diameters).toBeCloseTo(1, 10)
  })

  it('no Mach disk and no cell ends: no such rows', () => {
    const r = readout({ ...marks, cellEnds: [], machDisk: undefined })
    expect(r.meanSpacing).toBeNull()
    expect(r.machDisk).toBeNull()
    expect(r.cells).toEqual([])
  })

  it('one mark’s distance is measured on the axis of the whole set', () => {
    // 5 px off the axis does not change where it lies along the jet.
    expect(markDistance(marks, { x: 110, y: 105 })).toBeCloseTo(0.012, 12)
  })
})

describe('announcements', () => {
  it('says where a cell end went, from the exit plane, once the marks can be measured', () => {
    const e = complete()
    expect(describeMark(e.draft, { kind: 'cell-end', index: 1 }, 'placed', scale, image)).toBe(
      'Cell end 2 placed at 24.0 mm from the exit plane',
    )
    expect(describeMark(e.draft, { kind: 'mach-disk' }, 'moved', scale, image)).toBe(
      'Mach disk moved to 6.00 mm from the exit plane',
    )
  })

  it('gives pixels before there is a scale, and the span of the scale', () => {
    let e = place(newEditor(), 'cell-end', 110, 100)
    expect(describeMark(e.draft, { kind: 'cell-end', index: 0 }, 'placed', scale, image)).toBe(
      'Cell end 1 placed at 110, 100 pixels',
    )
    e = place(place(e, 'scale', 100, 50), 'scale', 100, 90)
    expect(describeMark(e.draft, { kind: 'scale', end: 1 }, 'placed', scale, image)).toBe(
      'Scale point 2 placed at 100, 90 pixels; the scale spans 40.0 pixels',
    )
  })
})
