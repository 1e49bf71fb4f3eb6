// `npm run backup`: a consistent dump of the app's database (mariadb-dump --single-transaction),
// gzip-compressed as it streams, into a dated file under .backups/ (git-ignored; BACKUP_DIR
// chooses another folder), with a sha256 sidecar that `npm run restore` and `sha256sum -c` check.
// Works on the project-owned MariaDB of `npm start` (started for the dump if it is not running)
// or on the server named by DATABASE_URL / DB_*.
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import {
  chmodSync,
  createWriteStream,
  existsSync,
  mkdirSync,
  renameSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs'
import path from 'node:path'
import { Transform } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { createGzip } from 'node:zlib'
import { ROOT } from './lib/bootstrap.mjs'
import {
  ToolError,
  clientArgs,
  formatBytes,
  listTables,
  main,
  onCleanup,
  openDatabase,
  query,
  shown,
} from './lib/db-tools.mjs'

const USAGE =
  'usage: npm run backup   (writes .backups/isentrope-<database>-<UTC time>.sql.gz; BACKUP_DIR=folder to write elsewhere)'

/** 2026-12-02T15:30:12.345Z → 20261202T153012Z: sorts by time and is safe in any file system. */
function stamp(date) {
  return date
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.\d+Z$/, 'Z')
}

/** Where the new dump goes; a second backup within the same second gets a suffix, never overwrites. */
function backupPath(dir, database) {
  const base = `isentrope-${database.replace(/[^a-zA-Z0-9_-]/g, '_')}-${stamp(new Date())}`
  for (let n = 1; ; n++) {
    const file = path.join(dir, `${base}${n === 1 ? '' : `-${n}`}.sql.gz`)
    if (!existsSync(file) && !existsSync(`${file}.partial`)) return file
  }
}

await main('backup', async () => {
  const extra = process.argv.slice(2)
  if (extra.includes('-h') || extra.includes('--help')) {
    process.stdout.write(`${USAGE}\n`)
    return
  }
  if (extra.length > 0) throw new ToolError(`unexpected argument ${extra[0]}\n${USAGE}`)

  const dir = path.resolve(process.env.BACKUP_DIR || path.join(ROOT, '.backups'))
  const db = await openDatabase({ createIfMissing: false })
  const args = clientArgs(db)

  const tables = await listTables(db, args)
  if (tables.length === 0)
    process.stderr.write(`[isentrope] warning: ${db.label} has no tables; the backup will be empty\n`)
  // --single-transaction gives one consistent snapshot of transactional (InnoDB) tables only.
  const other = await query(
    db,
    args,
    "SELECT table_name, engine FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' AND engine <> 'InnoDB'",
  )
  if (other.length > 0) {
    process.stderr.write(
      `[isentrope] warning: ${other.map((r) => `${r[0]} (${r[1]})`).join(', ')} ${other.length > 1 ? 'are' : 'is'} not InnoDB; ` +
        'such tables are not part of the consistent snapshot\n',
    )
  }

  // Backups hold password hashes and students' work: only this user may read them.
  mkdirSync(dir, { recursive: true, mode: 0o700 })
  const file = backupPath(dir, db.database)
  const partial = `${file}.partial`
  onCleanup(() => rmSync(partial, { force: true }))
  process.stdout.write(`[isentrope] backing up ${db.label} (${tables.length} tables)\n`)

  // https://mariadb.com/kb/en/mariadb-dump/
  const dump = spawn(
    'mariadb-dump',
    [
      ...args,
      // One consistent snapshot without locking the app out while the dump runs.
      '--single-transaction',
      // Row by row from the server, not the whole table in the client's memory.
      '--quick',
      // Uploaded files live in LONGBLOB columns: hex keeps their bytes exact through any charset.
      '--hex-blob',
      '--routines',
      '--triggers',
      // Tablespace statements need the PROCESS privilege, which the app's user does not have.
      '--no-tablespaces',
      // No `--databases`: the dump carries no CREATE DATABASE / USE, so it restores into whatever
      // empty database restore is pointed at. Every table is included, the session store's too.
      db.database,
    ],
    { stdio: ['ignore', 'pipe', 'pipe'] },
  )
  let dumpErr = ''
  dump.stderr.setEncoding('utf8').on('data', (d) => {
    dumpErr = (dumpErr + d).slice(-4000)
    process.stderr.write(d)
  })
  const exited = new Promise((resolve, reject) => {
    dump.on('error', (e) => reject(new ToolError(`could not run mariadb-dump: ${e.message}`)))
    dump.on('close', (code, signal) => resolve(code ?? signal))
  })

  const hash = createHash('sha256')
  const hashing = new Transform({
    transform(chunk, _enc, done) {
      hash.update(chunk)
      done(null, chunk)
    },
  })
  // Streamed end to end: the dump is never held in memory whole.
  const written = pipeline(dump.stdout, createGzip({ level: 6 }), hashing, createWriteStream(partial, { mode: 0o600 }))
  const [status] = await Promise.all([exited, written])
  if (status !== 0) {
    throw new ToolError(
      `mariadb-dump stopped (${status}) before the dump was complete; nothing was kept.${dumpErr ? `\n${dumpErr.trim()}` : ''}`,
    )
  }

  renameSync(partial, file)
  chmodSync(file, 0o600)
  const sha256 = hash.digest('hex')
  // The format of `sha256sum`, so `sha256sum -c FILE.sha256` checks it too.
  writeFileSync(`${file}.sha256`, `${sha256}  ${path.basename(file)}\n`, { mode: 0o600 })
  const size = statSync(file).size
  process.stdout.write(
    `[isentrope] backup written: ${shown(file)} (${formatBytes(size)}, ${tables.length} tables)\n` +
      `[isentrope] sha256 ${sha256} (in ${shown(`${file}.sha256`)})\n`,
  )
})
