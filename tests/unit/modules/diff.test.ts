import { describe, expect, it } from 'vitest'
import { diffSources } from '../../../shared/modules/diff'

const lines = (n: number, prefix = 'line') => Array.from({ length: n }, (_, i) => `${prefix} ${i + 1}`)
const text = (ls: string[]) => `${ls.join('\n')}\n`

describe('diffSources', () => {
  it('finds no difference between identical sources', () => {
    expect(diffSources('a\nb\n', 'a\nb\n')).toEqual({ added: 0, removed: 0, hunks: [] })
  })

  it('ignores Windows line endings and a missing final line break', () => {
    expect(diffSources('a\r\nb\r\n', 'a\nb')).toEqual({ added: 0, removed: 0, hunks: [] })
  })

  it('shows one changed line with three lines of context on each side', () => {
    const before = lines(20)
    const after = [...before]
    after[9] = 'line 10, edited'
    const d = diffSources(text(before), text(after))
    expect(d.added).toBe(1)
    expect(d.removed).toBe(1)
    expect(d.hunks).toEqual([
      {
        oldStart: 7,
        newStart: 7,
        lines: [
          { kind: 'ctx', text: 'line 7' },
          { kind: 'ctx', text: 'line 8' },
          { kind: 'ctx', text: 'line 9' },
          { kind: 'del', text: 'line 10' },
          { kind: 'add', text: 'line 10, edited' },
          { kind: 'ctx', text: 'line 11' },
          { kind: 'ctx', text: 'line 12' },
          { kind: 'ctx', text: 'line 13' },
        ],
      },
    ])
  })

  it('keeps two changes far apart in two hunks, with the new side’s line numbers', () => {
    const before = lines(40)
    const after = ['inserted at the top', ...before.slice(0, 35), ...before.slice(36)]
    const d = diffSources(text(before), text(after))
    expect(d.added).toBe(1)
    expect(d.removed).toBe(1)
    expect(d.hunks).toHaveLength(2)
    expect(d.hunks[0]?.lines[0]).toEqual({ kind: 'add', text: 'inserted at the top' })
    const second = d.hunks[1]
    expect(second?.lines.find((l) => l.kind === 'del')).toEqual({ kind: 'del', text: 'line 36' })
    // Old line 33 (first context line) is new line 34, after the insertion.
    expect(second?.oldStart).toBe(33)
    expect(second?.newStart).toBe(34)
  })

  it('counts every line of a source written from nothing as added', () => {
    const d = diffSources('', 'a\nb\nc\n')
    expect(d.added).toBe(3)
    expect(d.removed).toBe(0)
    expect(d.hunks[0]?.lines.map((l) => l.kind)).toEqual(['add', 'add', 'add'])
  })
})
