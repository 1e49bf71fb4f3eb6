import { existsSync, readFileSync, readdirSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { THEMED_COMPONENTS } from '../../src/theme/preset'

/**
 * The theme carries Aura's tokens only for the PrimeVue components the client uses (see
 * src/theme/preset.ts). A view that starts using another component must add its tokens there,
 * else the component shows without its colours and sizes; this test names the missing ones.
 */

const root = fileURLToPath(new URL('../..', import.meta.url))
const aura = path.join(root, 'node_modules/@primeuix/themes/dist/aura')

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true, recursive: true })
    .filter((e) => e.isFile() && /\.(vue|ts)$/.test(e.name))
    .map((e) => path.join(e.parentPath, e.name))
}

/** primevue/<name> → the PrimeVue modules it imports itself (a paginator draws a select, …). */
function innerComponents(name: string): string[] {
  const file = path.join(root, 'node_modules/primevue', name, 'index.mjs')
  if (!existsSync(file)) return []
  const text = readFileSync(file, 'utf8')
  return [...text.matchAll(/from 'primevue\/([a-z]+)'/g)].map((m) => m[1] as string)
}

/** Every PrimeVue module the client imports, and those they import in turn. */
function usedComponents(): Set<string> {
  const used = new Set<string>()
  for (const file of sourceFiles(path.join(root, 'src'))) {
    for (const m of readFileSync(file, 'utf8').matchAll(/from 'primevue\/([a-z]+)'/g)) used.add(m[1] as string)
  }
  const queue = [...used]
  for (let next = queue.pop(); next !== undefined; next = queue.pop()) {
    for (const inner of innerComponents(next)) {
      if (used.has(inner)) continue
      used.add(inner)
      queue.push(inner)
    }
  }
  return used
}

describe('the theme', () => {
  it('has Aura tokens for every PrimeVue component the client uses, and for those they draw inside', () => {
    const used = usedComponents()
    expect(used.has('button') && used.has('paginator')).toBe(true)
    const needed = [...used].filter((c) => existsSync(path.join(aura, c))).sort()
    const themed = Object.keys(THEMED_COMPONENTS)
    expect(needed.filter((c) => !themed.includes(c))).toEqual([])
  })

  it('carries no tokens for components nothing uses', () => {
    const used = usedComponents()
    expect(Object.keys(THEMED_COMPONENTS).filter((c) => !used.has(c))).toEqual([])
  })
})
