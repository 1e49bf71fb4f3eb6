import { readFileSync, readdirSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'

// The layers' one-way rules, read from the source: pages and components get data and writes from
// composables (only composables talk to src/api); services and background jobs read and write
// through repositories (only repositories speak Drizzle).
const root = resolve(import.meta.dirname, '../..')

function filesUnder(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = join(dir, e.name)
    if (e.isDirectory()) return filesUnder(p)
    return /\.(vue|ts)$/.test(e.name) ? [p] : []
  })
}

/** Every module a file imports or re-exports, static or dynamic. */
function importsOf(text: string): string[] {
  const found: string[] = []
  const patterns = [
    /\b(?:import|export)\s[^'"]*?\bfrom\s*['"]([^'"]+)['"]/g,
    /\bimport\s*['"]([^'"]+)['"]/g,
    /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g,
  ]
  for (const re of patterns) for (const m of text.matchAll(re)) found.push(m[1]!)
  return found
}

/** Whether an import specifier, seen from `file`, points into src/api. */
function reachesApi(file: string, spec: string): boolean {
  if (spec === '@/api' || spec.startsWith('@/api/')) return true
  if (!spec.startsWith('.')) return false
  const target = relative(join(root, 'src'), resolve(file, '..', spec)).replaceAll('\\', '/')
  return target === 'api' || target.startsWith('api/')
}

describe('the layers of client and server', () => {
  it('finds an import of src/api however it is written', () => {
    const view = join(root, 'src/views/SomeView.vue')
    const text = [
      "import { http } from '@/api/http'",
      "import type { ApiError } from '../api/http'",
      "export { fetchModules } from '@/api/modules'",
      "const m = await import('@/api/reports')",
      "import { useAction } from '@/composables/use-action'",
    ].join('\n')
    const hits = importsOf(text).filter((s) => reachesApi(view, s))
    expect(hits.sort()).toEqual(['../api/http', '@/api/http', '@/api/modules', '@/api/reports'])
  })

  it('no component or view imports from src/api', () => {
    const offenders: string[] = []
    for (const dir of ['src/components', 'src/views']) {
      for (const file of filesUnder(join(root, dir))) {
        for (const spec of importsOf(readFileSync(file, 'utf8'))) {
          if (reachesApi(file, spec)) offenders.push(`${relative(root, file)} imports ${spec}`)
        }
      }
    }
    expect(offenders).toEqual([])
  })

  it('no service or background job queries the database itself (only repositories import Drizzle)', () => {
    const offenders: string[] = []
    for (const dir of ['server/services', 'server/grading', 'server/mail']) {
      for (const file of filesUnder(join(root, dir))) {
        const text = readFileSync(file, 'utf8')
        for (const spec of importsOf(text)) {
          if (spec === 'drizzle-orm' || spec.startsWith('drizzle-orm/'))
            offenders.push(`${relative(root, file)} imports ${spec}`)
        }
        // Table objects are for queries; a type of a stored column is fine.
        for (const m of text.matchAll(/^import\s+(type\s+)?\{[^}]*\}\s+from\s+'[./]*db\/schema'/gm)) {
          if (!m[1]) offenders.push(`${relative(root, file)} imports tables from db/schema`)
        }
      }
    }
    expect(offenders).toEqual([])
  })
})
