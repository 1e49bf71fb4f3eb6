// `npm run backup` and `npm run restore`, run as an operator runs them, against a MariaDB of this
// file's own (a free loopback port, its own data folder), so the shared test database and other
// test files are never touched. A hand-in's raw file with every byte value, a NUL and invalid
// UTF-8 goes through backup → wipe → restore and must come back byte for byte.
import { spawn, spawnSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { gunzipSync } from 'node:zlib'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DATA, ROOT, dbEnv, nodeBin, startMariaDb } from '../../scripts/lib/bootstrap.mjs'
import type { ProjectDb } from '../../scripts/lib/bootstrap.mjs'
import { clientArgs, runCleanups } from '../../scripts/lib/db-tools.mjs'
import { createDb } from '../../server/db/client'
import type { DbHandle } from '../../server/db/client'
import { courses, moduleVersions, modules, submissionFiles, submissions, users } from '../../server/db/schema'
import { findFileBytes, insertFile, insertSubmission } from '../../server/repositories/submissions'

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex')

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer()
    s.once('error', reject)
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port
      s.close(() => resolve(port))
    })
  })
}

interface Ran {
  code: number | null
  stdout: string
  stderr: string
}

let server: ProjectDb
let name: string
let handle: DbHandle
let workDir: string
let backupDir: string
let childEnv: NodeJS.ProcessEnv
/** Quotes, a hash sign, spaces and a semicolon: each would break a naive option file or shell line. */
const password = `pw "q" #h 'x';=y ${randomBytes(6).toString('hex')}  `

// A hand-in's raw upload: a CSV-like head, then every byte value (NUL included), bytes that are
// not UTF-8, quote and backslash bytes, and random binary.
const head = Buffer.from('time_s,thrust_N,p_tank_kPa\n0.000,0.0,512.3\n', 'utf8')
const original = Buffer.concat([
  head,
  Buffer.from(Array.from({ length: 256 }, (_, i) => i)),
  Buffer.from([0x00, 0xff, 0xfe, 0xc3, 0x28, 0x80, 0x27, 0x22, 0x5c, 0x0d, 0x0a, 0x1a, 0x00]),
  randomBytes(300_000),
])
const originalSha = sha256(original)
let submissionId: number
let fileId: number

function runNpm(script: string, args: string[] = []): Promise<Ran> {
  return new Promise((resolve, reject) => {
    const child = spawn('npm', ['run', '--silent', script, ...(args.length > 0 ? ['--', ...args] : [])], {
      cwd: ROOT,
      env: childEnv,
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let stdout = ''
    let stderr = ''
    child.stdout.setEncoding('utf8').on('data', (d: string) => (stdout += d))
    child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d))
    child.on('error', reject)
    child.on('close', (code) => resolve({ code, stdout, stderr }))
  })
}

/** SQL as the server's root over its socket, the way an operator wipes a database. */
function rootSql(sql: string): string {
  const socket = path.join(DATA, name, 'run', 'mariadb.sock')
  const r = spawnSync('mariadb', ['--no-defaults', `--socket=${socket}`, '-uroot', '-N', '-B', '-e', sql], {
    encoding: 'utf8',
  })
  if (r.status !== 0) throw new Error(`root SQL failed: ${r.stderr}`)
  return r.stdout
}

function tableNames(): string[] {
  return rootSql(
    `SELECT table_name FROM information_schema.tables WHERE table_schema = '${server.database}' ORDER BY table_name`,
  )
    .split('\n')
    .filter((l) => l !== '')
}

function wipe(): void {
  rootSql(
    `DROP DATABASE \`${server.database}\`; CREATE DATABASE \`${server.database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
  )
}

async function readHandIn() {
  const file = await findFileBytes(handle.db, submissionId, fileId)
  const [fileRow] = await handle.db.select().from(submissionFiles).where(eq(submissionFiles.id, fileId))
  const [subRow] = await handle.db.select().from(submissions).where(eq(submissions.id, submissionId))
  const [sessionRow] = (await handle.pool.query('SELECT session_id, expires, data FROM sessions'))[0] as {
    session_id: string
    expires: number
    data: string
  }[]
  return { file, fileRow, subRow, sessionRow }
}

function theBackup(): string {
  const dumps = readdirSync(backupDir).filter((f) => f.endsWith('.sql.gz'))
  expect(dumps).toHaveLength(1)
  return path.join(backupDir, dumps[0]!)
}

beforeAll(async () => {
  const port = await freePort()
  name = `backup-test-${port}`
  server = await startMariaDb({
    name,
    port,
    database: 'isentrope_backup',
    user: 'isentrope_backup',
    password,
    fresh: true,
  })
  // Only this server: the shared test database's variables from `npm test` must not leak in.
  const rest = { ...process.env }
  for (const key of ['DATABASE_URL', 'DB_HOST', 'DB_PORT', 'DB_NAME', 'DB_USER', 'DB_PASSWORD', 'npm_config_force'])
    delete rest[key]
  workDir = mkdtempSync(path.join(tmpdir(), 'isentrope-backup-test-'))
  backupDir = path.join(workDir, 'backups')
  childEnv = { ...rest, ...dbEnv(server), BACKUP_DIR: backupDir }

  const tsx = nodeBin('tsx/dist/cli.mjs')
  const migrated = spawnSync(tsx[0], [tsx[1], 'scripts/migrate.ts'], { cwd: ROOT, env: childEnv, encoding: 'utf8' })
  if (migrated.status !== 0) throw new Error(`migrations failed: ${migrated.stderr}`)

  handle = createDb({ host: server.host, port: server.port, user: server.user, password, database: server.database })
  const db = handle.db
  const [user] = await db
    .insert(users)
    .values({ email: 'student@backup.example', displayName: 'Student B', passwordHash: null })
    .$returningId()
  const [course] = await db
    .insert(courses)
    .values({
      code: 'BK1',
      title: 'Backup course',
      term: 'Test term',
      institution: 'Test University (fictional)',
      timeZone: 'UTC',
    })
    .$returningId()
  const [mod] = await db
    .insert(modules)
    .values({ courseId: course!.id, slug: 'cold-flow', status: 'published' })
    .$returningId()
  const [version] = await db
    .insert(moduleVersions)
    .values({
      moduleId: mod!.id,
      number: 1,
      status: 'published',
      source: '# Cold flow',
      html: '<h1>Cold flow</h1>',
      title: 'Cold flow',
      valid: true,
    })
    .$returningId()
  submissionId = await insertSubmission(db, {
    courseId: course!.id,
    moduleId: mod!.id,
    moduleVersionId: version!.id,
    userId: user!.id,
    labGroupId: null,
    attempt: 1,
    inputs: {
      measurements: { throatDiameter: { value: 6.35, unit: 'mm' } },
      reported: { peakThrust: { value: 41.2, unit: 'N' } },
    },
    isLate: false,
    daysLate: 0,
    latePenalty: 0,
  })
  fileId = await insertFile(db, {
    submissionId,
    courseId: course!.id,
    tableKey: 'log',
    filename: 'run-1 (ü).csv',
    contentType: 'text/csv',
    size: original.length,
    sha256: originalSha,
    bytes: original,
    mapping: { time: { header: 'time_s', unit: 's' }, thrust: { header: 'thrust_N', unit: 'N' } },
    parsed: { time: [0, 0.01], thrust: [0, 41.2] },
    rowCount: 2,
  })
  // The session store's own table (outside the Drizzle schema), with its own DDL and one session.
  await handle.pool.query(readFileSync(path.join(ROOT, 'node_modules', 'express-mysql-session', 'schema.sql'), 'utf8'))
  await handle.pool.query('INSERT INTO sessions (session_id, expires, data) VALUES (?, ?, ?)', [
    'sid-backup-1',
    2_000_000_000,
    JSON.stringify({ cookie: { httpOnly: true }, passport: { user: user!.id } }),
  ])
})

afterAll(async () => {
  await handle?.close()
  await server?.stop()
  if (name) rmSync(path.join(DATA, name), { recursive: true, force: true })
  if (workDir) rmSync(workDir, { recursive: true, force: true })
})

describe('npm run backup and npm run restore', () => {
  let tablesBefore: string[]
  let before: Awaited<ReturnType<typeof readHandIn>>

  it('backup writes a dated gzip dump with a sha256 sidecar under the backup folder, blobs in hex', async () => {
    tablesBefore = tableNames()
    before = await readHandIn()
    expect(before.file?.bytes.equals(original)).toBe(true)

    const r = await runNpm('backup')
    expect(r.stderr).toBe('')
    expect(r.code).toBe(0)
    const file = theBackup()
    expect(path.basename(file)).toMatch(/^isentrope-isentrope_backup-\d{8}T\d{6}Z\.sql\.gz$/)
    expect(r.stdout).toContain(file)
    expect(r.stdout).toContain(`${tablesBefore.length} tables`)
    const sidecar = readFileSync(`${file}.sha256`, 'utf8')
    expect(sidecar).toBe(`${sha256(readFileSync(file))}  ${path.basename(file)}\n`)
    // Only the owner may read a dump of password hashes and students' work.
    expect(statSync(file).mode & 0o077).toBe(0)

    const sql = gunzipSync(readFileSync(file)).toString('latin1')
    expect(sql).toContain(`0x${original.subarray(0, 4096).toString('hex').toUpperCase()}`)
    expect(sql).toContain('CREATE TABLE `sessions`')
    expect(sql).not.toContain('CREATE DATABASE')
  }, 60_000)

  it('restore refuses a database that has tables, names it and the count, and changes nothing', async () => {
    const r = await runNpm('restore', [theBackup()])
    expect(r.code).not.toBe(0)
    expect(r.stderr).toContain(`\`isentrope_backup\` on 127.0.0.1:${server.port}`)
    expect(r.stderr).toContain(`already has ${tablesBefore.length} tables`)
    expect(r.stderr).toContain('--force')
    expect(tableNames()).toEqual(tablesBefore)
    expect((await readHandIn()).file?.bytes.equals(original)).toBe(true)
  }, 60_000)

  it('restore of a missing file says so and exits non-zero', async () => {
    const missing = path.join(workDir, 'no-such-backup.sql.gz')
    const r = await runNpm('restore', [missing])
    expect(r.code).not.toBe(0)
    expect(r.stderr).toContain(`no such file: ${missing}`)
  }, 60_000)

  it('restore refuses a file that no longer matches its checksum, before touching the database', async () => {
    const good = readFileSync(theBackup())
    const damaged = Buffer.from(good)
    const at = Math.floor(damaged.length / 2)
    damaged[at] = (damaged[at] ?? 0) ^ 0x01
    const copy = path.join(workDir, 'damaged.sql.gz')
    writeFileSync(copy, damaged)
    writeFileSync(`${copy}.sha256`, `${sha256(good)}  damaged.sql.gz\n`)
    wipe()
    const r = await runNpm('restore', [copy])
    expect(r.code).not.toBe(0)
    expect(r.stderr).toContain('does not match its checksum')
    expect(tableNames()).toEqual([])
  }, 60_000)

  it('restore refuses a dump cut short, even without a checksum file beside it', async () => {
    const good = readFileSync(theBackup())
    const copy = path.join(workDir, 'cut-short.sql.gz')
    writeFileSync(copy, good.subarray(0, Math.floor(good.length * 0.8)))
    wipe()
    const r = await runNpm('restore', [copy])
    expect(r.code).not.toBe(0)
    expect(r.stdout).toContain('its checksum is not verified')
    expect(r.stderr).toContain('cannot be read to the end')
    expect(tableNames()).toEqual([])
  }, 60_000)

  it('after the database is dropped and re-created empty, restore brings the hand-in back byte for byte', async () => {
    // The previous test left it wiped; make sure whatever order, the restore starts from empty.
    wipe()
    expect(tableNames()).toEqual([])
    const r = await runNpm('restore', [theBackup()])
    expect(r.stderr).toBe('')
    expect(r.code).toBe(0)
    expect(r.stdout).toContain('checksum matches')
    expect(r.stdout).toContain(`restored ${theBackup()} into \`isentrope_backup\``)
    expect(r.stdout).toContain(`${tablesBefore.length} tables (1 person, 1 course, 1 hand-in, 1 hand-in file)`)

    // A new pool: the old one's connections belonged to the dropped database.
    await handle.close()
    handle = createDb({ host: server.host, port: server.port, user: server.user, password, database: server.database })
    expect(tableNames()).toEqual(tablesBefore)
    const after = await readHandIn()
    expect(after.file?.bytes.equals(original)).toBe(true)
    expect(sha256(after.file!.bytes)).toBe(originalSha)
    expect(after.fileRow?.sha256).toBe(originalSha)
    expect(after).toEqual(before)
  }, 60_000)

  it('restore --force drops what is there and leaves the database as the dump has it', async () => {
    await handle.db
      .update(submissionFiles)
      .set({ bytes: Buffer.from('overwritten'), size: 11 })
      .where(eq(submissionFiles.id, fileId))
    await handle.pool.query('CREATE TABLE added_later (id INT PRIMARY KEY)')
    const r = await runNpm('restore', [theBackup(), '--force'])
    expect(r.code).toBe(0)
    expect(r.stdout).toContain(`dropping the ${tablesBefore.length + 1} tables`)
    expect(tableNames()).toEqual(tablesBefore)
    const after = await readHandIn()
    expect(after.file?.bytes.equals(original)).toBe(true)
    expect(after).toEqual(before)
  }, 60_000)
})

describe('the MariaDB clients get the password through a temporary option file', () => {
  it('never on the command line, in a file only the owner can read, removed at the end', async () => {
    const secret = `s3cret "with" #chars ${randomBytes(4).toString('hex')}`
    const args = clientArgs({ host: '127.0.0.1', port: 3306, user: 'someone', password: secret, database: 'x' })
    expect(args.some((a) => a.includes(secret) || a.startsWith('--password') || a.startsWith('-p'))).toBe(false)
    // Defaults options are honoured only as the very first argument.
    expect(args[0]).toMatch(/^--defaults-file=/)
    const file = args[0]!.slice('--defaults-file='.length)
    expect(statSync(file).mode & 0o077).toBe(0)
    expect(readFileSync(file, 'utf8')).toContain('password="s3cret \\"with\\" #chars')
    await runCleanups()
    expect(existsSync(file)).toBe(false)
  })
})
