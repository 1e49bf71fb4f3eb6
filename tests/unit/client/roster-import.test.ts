import { nextTick, ref } from 'vue'
import { describe, expect, it, vi } from 'vitest'
import type { RosterImportPreview, RosterImportRequest } from '../../../shared/schemas/roster-import'

// The server as the composable sees it: what was sent, and a preview with one move (row 2).
const sent: { url: 'preview' | 'confirm'; body: RosterImportRequest }[] = []
const preview = {
  ok: true,
  rows: [{ row: 2, email: 'a.vermeulen@univ.example', moves: ['moves from Group A1 to Group A3'] }],
  counts: { new: 0, changed: 0, moves: 1, invalid: 0 },
} as unknown as RosterImportPreview
vi.mock('@/api/roster-import', () => ({
  previewRosterImport: async (_c: number, body: RosterImportRequest) => {
    sent.push({ url: 'preview', body })
    return preview
  },
  confirmRosterImport: async (_c: number, body: RosterImportRequest) => {
    sent.push({ url: 'confirm', body })
    return {}
  },
}))
const { useRosterImport } = await import('../../../src/composables/use-roster-import')

describe('the roster import composable', () => {
  it('sends a chosen file as its own bytes, edited text as text, and unticked moves on confirm', async () => {
    const imp = useRosterImport(ref(7))
    // Windows-1252: é is the single byte 0xE9, not valid UTF-8.
    const bytes = Uint8Array.from(
      [...'email;name\na.vermeulen@univ.example;Aletta R\u00e9my\n'].map((c) => c.charCodeAt(0)),
    )
    const base64 = btoa(String.fromCharCode(...bytes))
    await imp.chooseFile(new File([bytes], 'class.csv'))
    expect(imp.csv.value).toContain('Aletta Rémy')
    await imp.runPreview()
    expect(sent.at(-1)).toEqual({ url: 'preview', body: { file: base64 } })

    imp.keepMove(2, false)
    await imp.runConfirm()
    expect(sent.at(-1)).toEqual({
      url: 'confirm',
      body: { file: base64, skip: [{ row: 2, email: 'a.vermeulen@univ.example' }] },
    })

    imp.csv.value += 'b@univ.example;Bo\n'
    await nextTick()
    imp.locale.value = 'hu'
    await nextTick()
    await imp.runPreview()
    expect(sent.at(-1)).toEqual({ url: 'preview', body: { csv: imp.csv.value, locale: 'hu' } })
    expect(imp.skippedMoves.value.size).toBe(0)
  })
})
