// `npm test`: the same bootstrap as `npm start`, against a separate MariaDB data directory and a
// fresh test database (never the demo data), then the type-check, a client build, and every
// vitest suite (unit, API against the real MariaDB, browser tests in Debian's Chromium).
// Ends with one plain line: `tests: N passed, M failed`.
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs'
import path from 'node:path'
import { spawnSync } from 'node:child_process'
import {
  DATA,
  ROOT,
  dbEnv,
  ensureDebianPackages,
  ensureNodeModules,
  externalDatabase,
  localSecrets,
  log,
  nodeBin,
  startMaildev,
  startMariaDb,
  waitForHttp,
} from './lib/bootstrap.mjs'

const ARTIFACTS = path.join(ROOT, '.artifacts')
const extraArgs = process.argv.slice(2)
let db = null
let maildev = null
let exitCode

async function cleanup() {
  if (maildev && maildev.child.exitCode === null) {
    maildev.child.kill('SIGTERM')
    await new Promise((r) => (maildev.child.exitCode !== null ? r() : maildev.child.once('exit', r)))
  }
  if (db) await db.stop()
}
process.on('SIGINT', () => void cleanup().then(() => process.exit(130)))
process.on('SIGTERM', () => void cleanup().then(() => process.exit(143)))

function step(name, cmd, args, env) {
  log(name)
  const r = spawnSync(cmd, args, { cwd: ROOT, env, stdio: 'inherit' })
  return r.status === 0
}

try {
  const external = externalDatabase()
  ensureDebianPackages([
    ...(external ? [] : [{ bin: 'mariadbd', pkg: 'mariadb-server' }]),
    { bin: 'chromium', pkg: 'chromium' },
  ])
  ensureNodeModules()
  mkdirSync(ARTIFACTS, { recursive: true })

  const secrets = localSecrets()
  const env = {
    ...process.env,
    NODE_ENV: 'test',
    LOG_LEVEL: process.env.LOG_LEVEL ?? 'silent',
    SESSION_SECRET: process.env.SESSION_SECRET ?? secrets.sessionSecret,
    CHROMIUM_PATH: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    ARTIFACTS_DIR: ARTIFACTS,
  }
  if (!external) {
    const port = Number(process.env.ISENTROPE_TEST_DB_PORT ?? 33062)
    db = await startMariaDb({
      // A run on its own port gets its own data folder, so two runs never share a server.
      name: port === 33062 ? 'mariadb-test' : `mariadb-test-${port}`,
      port,
      database: 'isentrope_test',
      user: 'isentrope_test',
      password: secrets.dbPassword,
      fresh: true,
    })
    Object.assign(env, dbEnv(db))
  }

  // Its own mail catcher on its own ports, so a running `npm start` is not disturbed.
  const smtpPort = Number(process.env.TEST_SMTP_PORT ?? 1026)
  const webPort = Number(process.env.TEST_MAILDEV_WEB_PORT ?? 1081)
  const mailDir = webPort === 1081 ? 'mail-test' : `mail-test-${webPort}`
  rmSync(path.join(DATA, mailDir), { recursive: true, force: true })
  maildev = startMaildev({ smtpPort, webPort, dir: mailDir })
  await waitForHttp(`http://127.0.0.1:${webPort}/api/email`)
  Object.assign(env, {
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    MAILDEV_API: `http://127.0.0.1:${webPort}`,
  })

  const tsx = nodeBin('tsx/dist/cli.mjs')
  const migrated = step('applying migrations to the test database', tsx[0], [tsx[1], 'scripts/migrate.ts'], env)
  const vueTsc = nodeBin('vue-tsc/bin/vue-tsc.js')
  const typed = step(
    'type-checking client, server and shared (vue-tsc --build)',
    vueTsc[0],
    [vueTsc[1], '--build'],
    env,
  )
  const eslint = nodeBin('eslint/bin/eslint.js')
  const prettier = nodeBin('prettier/bin/prettier.cjs')
  const linted =
    step('linting (eslint)', eslint[0], [eslint[1], '.'], env) &&
    step(
      'checking the layout (prettier --check)',
      prettier[0],
      [prettier[1], '--check', '--log-level', 'warn', '.'],
      env,
    )
  const migrationsMatch = step(
    'checking that the migrations match the Drizzle schema',
    process.execPath,
    ['scripts/check-migrations.mjs'],
    env,
  )
  const vite = nodeBin('vite/bin/vite.js')
  const built = step(
    'building the client for the browser tests',
    vite[0],
    [vite[1], 'build', '--logLevel', 'warn'],
    env,
  )

  const report = path.join(ARTIFACTS, 'vitest-report.json')
  rmSync(report, { force: true })
  const vitest = nodeBin('vitest/vitest.mjs')
  let passed = 0
  let failed = 0
  let ran = false
  if (migrated) {
    step(
      'running unit, API and browser tests (vitest)',
      vitest[0],
      [vitest[1], 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...extraArgs],
      env,
    )
    if (existsSync(report)) {
      const r = JSON.parse(readFileSync(report, 'utf8'))
      passed = r.numPassedTests ?? 0
      // A file that fails to load or whose setup fails has no failed test of its own (its tests
      // are skipped); count it as one failure.
      const brokenFiles = (r.testResults ?? []).filter(
        (f) => f.status === 'failed' && !(f.assertionResults ?? []).some((a) => a.status === 'failed'),
      ).length
      failed = (r.numFailedTests ?? 0) + brokenFiles
      ran = r.numTotalTests > 0
    }
  }
  if (!migrated) log('FAILED: migrations did not apply')
  if (!typed) log('FAILED: type-check')
  if (!built) log('FAILED: client build')
  if (!linted) log('FAILED: lint (run `npm run format`, then fix what eslint still reports)')
  if (!migrationsMatch) log('FAILED: the Drizzle schema and the committed migrations differ')
  if (!ran) log('FAILED: no tests ran')
  process.stdout.write(`tests: ${passed} passed, ${failed} failed\n`)
  exitCode = migrated && typed && linted && migrationsMatch && built && ran && failed === 0 ? 0 : 1
} catch (err) {
  process.stderr.write(`[isentrope] test run failed: ${err instanceof Error ? err.stack : String(err)}\n`)
  process.stdout.write('tests: 0 passed, 1 failed\n')
  exitCode = 1
} finally {
  await cleanup()
}
process.exit(exitCode)
