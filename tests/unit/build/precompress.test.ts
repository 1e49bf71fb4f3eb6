import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import type { ResolvedConfig } from 'vite'
import { afterAll, describe, expect, it } from 'vitest'
import { precompress } from '../../../scripts/lib/vite-precompress'

/** The build step that writes .br and .gz beside each client file (run by `vite build`). */

const dir = mkdtempSync(path.join(tmpdir(), 'isentrope-precompress-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

const text = (what: string) => Array.from({ length: 300 }, (_, i) => `${what} ${i}`).join('\n')

async function runPlugin(outDir: string): Promise<void> {
  const plugin = precompress()
  const configResolved = plugin.configResolved as (c: ResolvedConfig) => void
  const closeBundle = plugin.closeBundle as () => Promise<void>
  configResolved({ root: dir, build: { outDir } } as ResolvedConfig)
  await closeBundle()
}

describe('precompress', () => {
  it('writes brotli and gzip copies of scripts, styles and pages that decode to the original bytes', async () => {
    mkdirSync(path.join(dir, 'out/assets'), { recursive: true })
    const files = {
      'out/index.html': `<!doctype html>${text('page')}`,
      'out/assets/app-abc.js': text('const x ='),
      'out/assets/app-abc.css': text('.a{}'),
      'out/assets/logo.svg': `<svg>${text('<!-- x -->')}</svg>`,
    }
    for (const [f, body] of Object.entries(files)) writeFileSync(path.join(dir, f), body)
    await runPlugin('out')
    for (const [f, body] of Object.entries(files)) {
      const file = path.join(dir, f)
      expect(brotliDecompressSync(readFileSync(`${file}.br`)).toString(), f).toBe(body)
      expect(gunzipSync(readFileSync(`${file}.gz`)).toString(), f).toBe(body)
      expect(readFileSync(`${file}.br`).length, f).toBeLessThan(body.length / 4)
    }
  })

  it('leaves out fonts, images, tiny files and copies that would not be smaller', async () => {
    mkdirSync(path.join(dir, 'out2/assets'), { recursive: true })
    writeFileSync(path.join(dir, 'out2/assets/font.woff2'), text('glyph'))
    writeFileSync(path.join(dir, 'out2/assets/tiny.js'), 'export {}\n')
    // Random bytes do not compress.
    writeFileSync(path.join(dir, 'out2/assets/noise.js'), randomBytes(4000))
    await runPlugin('out2')
    for (const f of ['font.woff2', 'tiny.js']) {
      expect(existsSync(path.join(dir, 'out2/assets', `${f}.br`)), f).toBe(false)
      expect(existsSync(path.join(dir, 'out2/assets', `${f}.gz`)), f).toBe(false)
    }
    expect(existsSync(path.join(dir, 'out2/assets/noise.js.gz'))).toBe(false)
  })
})
