import type { Express } from 'express'

interface LayerLike {
  rawPath?: unknown
  route?: { path: string; methods: Record<string, boolean> }
  handle?: { stack?: LayerLike[] }
}

/** Every route registered on the app, as "METHOD /path" (Express 5 / router 2 internals). */
export function listRoutes(app: Express): string[] {
  const out: string[] = []
  const walk = (stack: LayerLike[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const m of Object.keys(layer.route.methods)) {
          if (m === '_all') continue
          out.push(`${m.toUpperCase()} ${(prefix + layer.route.path).replace(/\/$/, '') || '/'}`)
        }
      } else if (layer.handle?.stack) {
        const p = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : ''
        walk(layer.handle.stack, prefix + p)
      }
    }
  }
  const router = (app as unknown as { router: { stack: LayerLike[] } }).router
  walk(router.stack, '')
  return [...new Set(out)].sort()
}
