import { readFile, readdir, stat, writeFile } from 'node:fs/promises'
import path from 'node:path'
import { brotliCompress, constants, gzip } from 'node:zlib'
import { promisify } from 'node:util'
import type { Plugin, ResolvedConfig } from 'vite'

const brotli = promisify(brotliCompress)
const gz = promisify(gzip)

/** Text formats worth compressing; fonts (woff2) and images are compressed already. */
const COMPRESSIBLE = /\.(?:js|mjs|css|html|svg|json|txt|map)$/
/** Below this a compressed copy saves less than the headers it needs. */
const MIN_BYTES = 1024

/**
 * Writes `name.br` and `name.gz` beside every compressible file of the client build, once, at the
 * highest levels (brotli 11, gzip 9), so the server sends them as they are and compresses nothing
 * per request. A copy that comes out no smaller than the original is left out.
 * The server picks one by the request's Accept-Encoding (express-static-gzip in server/app.ts).
 * https://vite.dev/guide/api-plugin#universal-hooks (closeBundle runs after the files are written)
 */
export function precompress(): Plugin {
  let config: ResolvedConfig
  return {
    name: 'isentrope-precompress',
    apply: 'build',
    configResolved(resolved) {
      config = resolved
    },
    async closeBundle() {
      const outDir = path.resolve(config.root, config.build.outDir)
      const files = await listFiles(outDir)
      await Promise.all(
        files
          .filter((f) => COMPRESSIBLE.test(f))
          .map(async (file) => {
            if ((await stat(file)).size < MIN_BYTES) return
            const raw = await readFile(file)
            const [br, gzipped] = await Promise.all([
              brotli(raw, {
                params: {
                  [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY,
                  [constants.BROTLI_PARAM_SIZE_HINT]: raw.length,
                },
              }),
              gz(raw, { level: constants.Z_BEST_COMPRESSION }),
            ])
            if (br.length < raw.length) await writeFile(`${file}.br`, br)
            if (gzipped.length < raw.length) await writeFile(`${file}.gz`, gzipped)
          }),
      )
    },
  }
}

async function listFiles(dir: string): Promise<string[]> {
  const entries = await readdir(dir, { withFileTypes: true, recursive: true })
  return entries.filter((e) => e.isFile()).map((e) => path.join(e.parentPath, e.name))
}
