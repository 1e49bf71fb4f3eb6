// `npm start`: everything from nothing. Installs what is missing, starts a project-owned MariaDB
// on 127.0.0.1 (unless DATABASE_URL/DB_HOST points at one), migrates, seeds the demo course once,
// starts the mail catcher on loopback, builds the client and serves the app. Ctrl-C stops all of it.
import { spawn } from 'node:child_process'
import {
  ROOT,
  dbEnv,
  ensureDebianPackages,
  ensureNodeModules,
  externalDatabase,
  fail,
  localSecrets,
  log,
  nodeBin,
  run,
  startMaildev,
  startMariaDb,
  waitForHttp,
} from './lib/bootstrap.mjs'

const children = []
let db = null
let stopping = false

async function stopAll(code = 0) {
  if (stopping) return
  stopping = true
  log('stopping…')
  for (const c of children.reverse()) {
    if (c.exitCode === null && c.signalCode === null) c.kill('SIGTERM')
  }
  await Promise.all(
    children.map((c) => new Promise((r) => (c.exitCode !== null || c.signalCode !== null ? r() : c.once('exit', r)))),
  )
  if (db) await db.stop()
  log('stopped')
  process.exit(code)
}
process.on('SIGINT', () => void stopAll(0))
process.on('SIGTERM', () => void stopAll(0))

try {
  const external = externalDatabase()
  if (!external) ensureDebianPackages([{ bin: 'mariadbd', pkg: 'mariadb-server' }])
  ensureNodeModules()

  const secrets = localSecrets()
  const env = {
    ...process.env,
    NODE_ENV: process.env.NODE_ENV ?? 'production',
    SESSION_SECRET: process.env.SESSION_SECRET ?? secrets.sessionSecret,
  }
  if (!external) {
    db = await startMariaDb({
      name: 'mariadb',
      port: Number(process.env.ISENTROPE_DB_PORT ?? 33061),
      database: 'isentrope',
      user: 'isentrope',
      password: secrets.dbPassword,
    })
    Object.assign(env, dbEnv(db))
  } else {
    log('using the database server given by DATABASE_URL / DB_HOST')
  }

  const tsx = nodeBin('tsx/dist/cli.mjs')
  run(tsx[0], [tsx[1], 'scripts/migrate.ts'], { env })
  run(tsx[0], [tsx[1], 'scripts/seed.ts'], { env })

  const smtpPort = Number(process.env.SMTP_PORT ?? 1025)
  const mailWebPort = Number(process.env.MAILDEV_WEB_PORT ?? 1080)
  if (!process.env.SMTP_HOST) {
    const mail = startMaildev({ smtpPort, webPort: mailWebPort, dir: 'mail' })
    children.push(mail.child)
    Object.assign(env, { SMTP_HOST: '127.0.0.1', SMTP_PORT: String(smtpPort) })
  }

  log('building the client (vite build)')
  const vite = nodeBin('vite/bin/vite.js')
  run(vite[0], [vite[1], 'build', '--logLevel', 'warn'], { env })

  const port = Number(process.env.PORT ?? 3000)
  const appUrl = process.env.APP_URL ?? `http://127.0.0.1:${port}`
  Object.assign(env, { PORT: String(port), APP_URL: appUrl, HOST: process.env.HOST ?? '127.0.0.1' })
  const server = spawn(tsx[0], [tsx[1], 'server/index.ts'], { cwd: ROOT, env, stdio: 'inherit' })
  children.push(server)
  server.on('exit', (code) => {
    if (!stopping) {
      log(`the server exited (${code}); stopping the rest`)
      void stopAll(code ?? 1)
    }
  })
  await waitForHttp(`http://127.0.0.1:${port}/api/health`)

  const pw = process.env.DEMO_PASSWORD ?? 'nozzle-demo-2027'
  process.stdout.write(
    [
      '',
      '  Isentrope is running.',
      `  App:           ${appUrl}`,
      process.env.SMTP_HOST
        ? ''
        : `  Mail catcher:  http://127.0.0.1:${mailWebPort}  (every e-mail the app sends lands here)`,
      db ? `  MariaDB:       127.0.0.1:${db.port}  (data in .data/mariadb)` : '',
      '',
      `  Demo sign-ins (password for all: ${pw})`,
      '    instructor   instructor@calder-ridge.example',
      '    TA           ta.a@calder-ridge.example   (Section A)',
      '    TA           ta.b@calder-ridge.example   (Section B)',
      '    student      aletta.ashgrove@students.calder-ridge.example',
      '    site admin   admin@calder-ridge.example',
      '',
      '  Press Ctrl-C to stop everything.',
      '',
    ]
      .filter((l, i, a) => l !== '' || a[i - 1] !== '')
      .join('\n') + '\n',
  )
} catch (err) {
  process.stderr.write(`[isentrope] start failed: ${err instanceof Error ? err.message : String(err)}\n`)
  if (!stopping) await stopAll(1)
  fail('start failed')
}
