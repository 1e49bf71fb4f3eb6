// Bootstrap shared by `npm start` and `npm test`. Plain Node with no dependencies, because it
// runs before node_modules exists on a fresh machine: it installs what is missing (Debian
// packages, npm dependencies), then owns a MariaDB server bound to 127.0.0.1 whose data lives
// under the git-ignored .data/ folder.
import { spawn, spawnSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, lstatSync, mkdirSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { setTimeout as sleep } from 'node:timers/promises'
import path from 'node:path'
import { fileURLToPath } from 'node:url'

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..')
export const DATA = path.join(ROOT, '.data')

export function log(message) {
  process.stdout.write(`[isentrope] ${message}\n`)
}

export function fail(message) {
  process.stderr.write(`[isentrope] ${message}\n`)
  process.exit(1)
}

function which(bin) {
  for (const dir of (process.env.PATH ?? '').split(':').concat(['/usr/sbin', '/usr/bin', '/sbin'])) {
    const full = path.join(dir, bin)
    if (existsSync(full)) return full
  }
  return null
}

/** Runs a command to completion, inheriting output; throws with the command line on failure. */
export function run(cmd, args, options = {}) {
  const result = spawnSync(cmd, args, { stdio: 'inherit', cwd: ROOT, ...options })
  if (result.status !== 0) {
    throw new Error(`${cmd} ${args.join(' ')} exited with ${result.status ?? result.signal}`)
  }
  return result
}

/**
 * Installs Debian packages whose binaries are missing. Needs root (or sudo) and apt-get.
 * @param {{ bin: string, pkg: string }[]} wanted
 */
export function ensureDebianPackages(wanted) {
  const missing = wanted.filter((w) => !which(w.bin)).map((w) => w.pkg)
  if (missing.length === 0) return
  if (!which('apt-get')) fail(`Missing ${missing.join(', ')} and apt-get is not available; install them by hand.`)
  const asRoot = process.getuid?.() === 0
  const prefix = asRoot ? [] : ['sudo']
  if (!asRoot && !which('sudo')) fail(`Missing ${missing.join(', ')}; run as root or install them by hand.`)
  log(`installing Debian packages: ${missing.join(', ')} (apt-get)`)
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  const [cmd, ...pre] = asRoot ? ['apt-get'] : [...prefix, 'apt-get']
  run(cmd, [...pre, 'update', '-qq'], { env })
  run(cmd, [...pre, 'install', '-y', '-qq', '--no-install-recommends', ...missing], { env })
}

/** `npm ci` when node_modules is missing or was installed from a different package-lock.json. */
export function ensureNodeModules() {
  const lock = path.join(ROOT, 'package-lock.json')
  // The lock file's content decides, not its date: a fresh checkout or a second working copy has
  // a newer lock file than an install that already matches it.
  const marker = path.join(ROOT, 'node_modules', '.isentrope-lock-sha256')
  const want = createHash('sha256').update(readFileSync(lock)).digest('hex')
  if (existsSync(marker) && readFileSync(marker, 'utf8').trim() === want) return
  const npmMarker = path.join(ROOT, 'node_modules', '.package-lock.json')
  // Installs made before the marker existed: trust npm's own record when it is newer than the lock.
  if (!existsSync(marker) && existsSync(npmMarker) && statSync(npmMarker).mtimeMs >= statSync(lock).mtimeMs) {
    writeFileSync(marker, want + '\n')
    return
  }
  // A second working copy whose node_modules links to another checkout's install: npm ci would
  // empty the linked install for every copy that shares it. Say so and use it as it is.
  const modules = path.join(ROOT, 'node_modules')
  if (existsSync(modules) && lstatSync(modules).isSymbolicLink()) {
    log('node_modules is a link to another install whose package-lock.json differs; not reinstalling it')
    return
  }
  log('installing npm dependencies (npm ci)')
  run('npm', ['ci', '--no-audit', '--no-fund'])
  writeFileSync(marker, want + '\n')
}

/**
 * Local secrets, generated once per checkout into .data/local-secrets.json (git-ignored).
 * Production passes its own through the environment; these only serve the local database.
 */
export function localSecrets() {
  mkdirSync(DATA, { recursive: true })
  const file = path.join(DATA, 'local-secrets.json')
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8'))
  const secrets = {
    dbPassword: randomBytes(18).toString('base64url'),
    sessionSecret: randomBytes(32).toString('base64url'),
  }
  writeFileSync(file, JSON.stringify(secrets, null, 2), { mode: 0o600 })
  return secrets
}

function ping(socket) {
  const r = spawnSync('mariadb-admin', ['--no-defaults', `--socket=${socket}`, '-uroot', 'ping'], {
    stdio: 'ignore',
  })
  return r.status === 0
}

/** Whether the process named in a pid file is alive. */
function pidAlive(pidFile) {
  try {
    const pid = Number(readFileSync(pidFile, 'utf8').trim())
    if (!pid) return false
    process.kill(pid, 0)
    return true
  } catch {
    return false
  }
}

function rootSql(socket, sql) {
  const r = spawnSync('mariadb', ['--no-defaults', `--socket=${socket}`, '-uroot', '-e', sql], {
    encoding: 'utf8',
  })
  if (r.status !== 0) throw new Error(`MariaDB refused: ${r.stderr.trim()}`)
}

/**
 * Starts (or reuses) a project-owned mariadbd on 127.0.0.1 and makes sure the app's database and
 * its limited user exist.
 * @param {{ name: string, port: number, database: string, user: string, password: string, fresh?: boolean }} o
 * @returns {Promise<{ host: string, port: number, database: string, user: string, password: string, stop: () => Promise<void>, owned: boolean }>}
 */
export async function startMariaDb(o) {
  const dir = path.join(DATA, o.name)
  const datadir = path.join(dir, 'data')
  const rundir = path.join(dir, 'run')
  const socket = path.join(rundir, 'mariadb.sock')
  mkdirSync(rundir, { recursive: true })

  let child = null
  // A server of ours may still be running on this data directory (a run that was killed, or one
  // still shutting down). Reuse it only if it listens on the port asked for; otherwise stop it.
  let reuse = false
  if (ping(socket)) {
    const port = spawnSync(
      'mariadb',
      ['--no-defaults', `--socket=${socket}`, '-uroot', '-N', '-B', '-e', 'SELECT @@port'],
      { encoding: 'utf8' },
    )
    reuse = port.status === 0 && Number(port.stdout.trim()) === o.port
    if (reuse) log(`reusing the MariaDB already running on ${socket}`)
    else {
      log(`stopping the MariaDB left running on ${socket}`)
      spawnSync('mariadb-admin', ['--no-defaults', `--socket=${socket}`, '-uroot', 'shutdown'], { stdio: 'ignore' })
    }
  }
  if (!reuse) {
    // Wait out a shutdown in progress before starting a new server on the same files.
    const pidFile = path.join(rundir, 'mariadb.pid')
    for (const until = Date.now() + 60_000; pidAlive(pidFile) && Date.now() < until;) await sleep(200)
    if (!existsSync(path.join(datadir, 'mysql'))) {
      log(`initialising a MariaDB data directory in ${path.relative(ROOT, datadir)}`)
      mkdirSync(datadir, { recursive: true })
      run(
        'mariadb-install-db',
        [
          '--no-defaults',
          `--datadir=${datadir}`,
          '--user=root',
          '--auth-root-authentication-method=normal',
          '--skip-test-db',
          '--skip-name-resolve',
        ],
        { stdio: 'ignore' },
      )
    }
    const args = [
      // --no-defaults must come first, or /etc/mysql/my.cnf is read.
      '--no-defaults',
      ...(process.getuid?.() === 0 ? ['--user=root'] : []),
      `--datadir=${datadir}`,
      '--bind-address=127.0.0.1',
      `--port=${o.port}`,
      `--socket=${socket}`,
      `--pid-file=${path.join(rundir, 'mariadb.pid')}`,
      `--log-error=${path.join(rundir, 'mariadb.err')}`,
      '--skip-name-resolve',
      '--character-set-server=utf8mb4',
      '--collation-server=utf8mb4_unicode_ci',
      '--max-connections=300',
      // Uploads of up to 20 MB plus their parsed JSON travel in one packet.
      '--max-allowed-packet=256M',
    ]
    child = spawn(which('mariadbd') ?? 'mariadbd', args, { stdio: 'ignore', detached: false })
    let exited = false
    child.on('exit', () => {
      exited = true
    })
    const started = Date.now()
    while (!ping(socket)) {
      if (exited) fail(`MariaDB exited during start-up; see ${path.join(rundir, 'mariadb.err')}`)
      if (Date.now() - started > 30_000)
        fail(`MariaDB did not answer within 30 s; see ${path.join(rundir, 'mariadb.err')}`)
      await sleep(100)
    }
    log(`MariaDB listening on 127.0.0.1:${o.port} (data in ${path.relative(ROOT, datadir)})`)
  }

  const db = o.database.replace(/[^a-z0-9_]/gi, '')
  const user = o.user.replace(/[^a-z0-9_]/gi, '')
  const pw = o.password.replace(/'/g, "''")
  rootSql(
    socket,
    [
      o.fresh ? `DROP DATABASE IF EXISTS \`${db}\`;` : '',
      `CREATE DATABASE IF NOT EXISTS \`${db}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`,
      `CREATE USER IF NOT EXISTS '${user}'@'127.0.0.1' IDENTIFIED BY '${pw}';`,
      `ALTER USER '${user}'@'127.0.0.1' IDENTIFIED BY '${pw}';`,
      `GRANT ALL PRIVILEGES ON \`${db}\`.* TO '${user}'@'127.0.0.1';`,
    ].join(' '),
  )

  const stop = async () => {
    if (!child) return
    spawnSync('mariadb-admin', ['--no-defaults', `--socket=${socket}`, '-uroot', 'shutdown'], { stdio: 'ignore' })
    const until = Date.now() + 20_000
    while (child.exitCode === null && child.signalCode === null && Date.now() < until) await sleep(100)
    if (child.exitCode === null && child.signalCode === null) {
      child.kill('SIGTERM')
      const hard = Date.now() + 30_000
      while (child.exitCode === null && child.signalCode === null && Date.now() < hard) await sleep(100)
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL')
    }
  }
  return { host: '127.0.0.1', port: o.port, database: db, user, password: o.password, stop, owned: child !== null }
}

/** Environment variables describing a database for the server, migrations and seed. */
export function dbEnv(db) {
  return {
    DB_HOST: db.host,
    DB_PORT: String(db.port),
    DB_NAME: db.database,
    DB_USER: db.user,
    DB_PASSWORD: db.password,
  }
}

/** True when the caller points at an existing database server (we then start none). */
export function externalDatabase() {
  return Boolean(process.env.DATABASE_URL || process.env.DB_HOST)
}

/**
 * Starts maildev on loopback with its mail kept under .data/.
 * @returns {{ child: import('node:child_process').ChildProcess, smtpPort: number, webPort: number }}
 */
export function startMaildev({ smtpPort, webPort, dir }) {
  const mailDir = path.join(DATA, dir)
  mkdirSync(mailDir, { recursive: true })
  const child = spawn(
    process.execPath,
    [
      path.join(ROOT, 'node_modules', 'maildev', 'dist', 'bin', 'maildev.js'),
      '--ip',
      '127.0.0.1',
      '--web-ip',
      '127.0.0.1',
      '--smtp',
      String(smtpPort),
      '--web',
      String(webPort),
      '--mail-directory',
      mailDir,
      '--silent',
    ],
    { stdio: ['ignore', 'ignore', 'inherit'] },
  )
  return { child, smtpPort, webPort }
}

/** Waits until an HTTP URL answers (any status). */
export async function waitForHttp(url, timeoutMs = 30_000) {
  const until = Date.now() + timeoutMs
  for (;;) {
    try {
      await fetch(url)
      return
    } catch {
      if (Date.now() > until) throw new Error(`${url} did not answer within ${timeoutMs / 1000} s`)
      await sleep(150)
    }
  }
}

/** Path of a binary inside node_modules, run with this Node (so the PID we hold is the process's). */
export function nodeBin(pkgPath) {
  return [process.execPath, path.join(ROOT, 'node_modules', ...pkgPath.split('/'))]
}
