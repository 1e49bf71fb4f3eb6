// `npm run bench`: the formula library, the combustion library, the grading step, the feedback report PDF, photographs, hand-in throughput over HTTP on
// loopback (against a project-owned bench database, started and stopped here), and the bytes of JavaScript three
// pages download in Chromium (after a fresh client build). Prints figures; speed goals are read from these, never
// asserted in tests.
import { existsSync } from 'node:fs'
import path from 'node:path'
import { spawnSync } from 'node:child_process'
import {
  ROOT,
  dbEnv,
  ensureDebianPackages,
  ensureNodeModules,
  externalDatabase,
  localSecrets,
  log,
  nodeBin,
  startMariaDb,
} from '../lib/bootstrap.mjs'

ensureNodeModules()
const tsx = nodeBin('tsx/dist/cli.mjs')
const runTs = (file, env = process.env) =>
  spawnSync(tsx[0], [tsx[1], file], { cwd: ROOT, stdio: 'inherit', env }).status === 0

// `npm run bench -- pages` runs only the page-weight part.
const onlyPages = process.argv[2] === 'pages'
let ok = true
if (!onlyPages) {
  ok = runTs('scripts/bench/physics.ts')
  ok = runTs('scripts/bench/thermo.ts') && ok
  if (existsSync(path.join(ROOT, 'scripts/bench/grading.ts'))) ok = runTs('scripts/bench/grading.ts') && ok
  ok = runTs('scripts/bench/report.ts') && ok
  ok = runTs('scripts/bench/photo.ts') && ok
}

let db = null
try {
  const secrets = localSecrets()
  const env = { ...process.env, SESSION_SECRET: process.env.SESSION_SECRET ?? secrets.sessionSecret, MAIL_POLL_MS: '0' }
  if (!externalDatabase()) {
    ensureDebianPackages([{ bin: 'mariadbd', pkg: 'mariadb-server' }])
    db = await startMariaDb({
      name: 'mariadb-bench',
      port: Number(process.env.ISENTROPE_BENCH_DB_PORT ?? 33063),
      database: 'isentrope_bench',
      user: 'isentrope_bench',
      password: secrets.dbPassword,
      fresh: true,
    })
    Object.assign(env, dbEnv(db))
  }
  ok = runTs('scripts/migrate.ts', env) && ok
  if (!onlyPages) ok = runTs('scripts/bench/submit-http.ts', env) && ok
  ensureDebianPackages([{ bin: 'chromium', pkg: 'chromium' }])
  const vite = nodeBin('vite/bin/vite.js')
  const built = spawnSync(vite[0], [vite[1], 'build', '--logLevel', 'warn'], { cwd: ROOT, stdio: 'inherit', env })
  ok = built.status === 0 && runTs('scripts/bench/page-weight.ts', env) && ok
} finally {
  if (db) await db.stop()
}
log(ok ? 'benchmarks finished' : 'a benchmark failed')
process.exit(ok ? 0 : 1)
