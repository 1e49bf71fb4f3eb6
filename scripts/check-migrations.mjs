// Fails when the Drizzle schema (server/db/schema) and the committed migrations (drizzle/) drift
// apart: drizzle-kit's own `check` for the migration history, then drizzle-kit's `generate` into a
// scratch copy of drizzle/, which must find nothing to write. The real drizzle/ is never touched.
import { cpSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs'
import path from 'node:path'
import { spawnSync } from 'node:child_process'
import { fileURLToPath } from 'node:url'

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..')
const kit = path.join(ROOT, 'node_modules', 'drizzle-kit', 'bin.cjs')

function run(args) {
  const r = spawnSync(process.execPath, [kit, ...args], { cwd: ROOT, encoding: 'utf8' })
  return { ok: r.status === 0, out: `${r.stdout ?? ''}${r.stderr ?? ''}` }
}

// drizzle-kit reads `out` relative to the project, so the scratch copy lives inside it (git-ignored).
mkdirSync(path.join(ROOT, '.artifacts'), { recursive: true })
const scratch = mkdtempSync(path.join(ROOT, '.artifacts', 'drift-'))
let failed = false
try {
  const checked = run(['check', '--config', 'drizzle.config.ts'])
  if (!checked.ok) {
    failed = true
    process.stderr.write(`drizzle-kit check failed:\n${checked.out}\n`)
  }
  const out = path.join(scratch, 'drizzle')
  cpSync(path.join(ROOT, 'drizzle'), out, { recursive: true })
  const before = new Set(readdirSync(out))
  // A config beside the real one, with the same schema and an output folder in the scratch copy.
  const config = path.join(ROOT, `.drift-check.${process.pid}.config.ts`)
  writeFileSync(
    config,
    `import base from './drizzle.config'\nexport default { ...base, out: ${JSON.stringify('./' + path.relative(ROOT, out))} }\n`,
  )
  try {
    const generated = run(['generate', '--config', path.basename(config), '--name', 'drift'])
    const added = readdirSync(out).filter((f) => !before.has(f))
    // drizzle-kit may exit 0 after an error, so only its own "nothing to migrate" line passes.
    const clean = generated.ok && added.length === 0 && /No schema changes/i.test(generated.out)
    if (!clean) {
      failed = true
      process.stderr.write(
        `The Drizzle schema and drizzle/ differ: drizzle-kit would write ${added.join(', ') || '(nothing, but failed)'}.\n` +
          'Run `npm run db:generate -- --name what_changed` and commit the migration.\n' +
          generated.out,
      )
    }
  } finally {
    rmSync(config, { force: true })
  }
} finally {
  rmSync(scratch, { recursive: true, force: true })
}
if (!failed) process.stdout.write('migrations match the schema\n')
process.exit(failed ? 1 : 0)
