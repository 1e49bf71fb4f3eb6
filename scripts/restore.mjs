// `npm run restore -- FILE [--force]`: loads a dump made by `npm run backup` into an empty
// database: the project-owned MariaDB of `npm start` (started for the restore if it is not
// running) or the server named by DATABASE_URL / DB_*. The file is read first to check its sha256
// sidecar (when present) and that it is complete, so a damaged or cut-short dump is refused before
// anything is written.
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { closeSync, createReadStream, existsSync, openSync, readFileSync, readSync, statSync } from 'node:fs'
import { Writable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { createGunzip } from 'node:zlib'
import { ToolError, clientArgs, formatBytes, listTables, main, openDatabase, query, shown } from './lib/db-tools.mjs'

const USAGE = 'usage: npm run restore -- FILE [--force]   (FILE: a .sql.gz or .sql written by npm run backup)'
/** mariadb-dump's last line; a dump without it was cut short. */
const COMPLETED = '-- Dump completed'
/** Tables worth naming after a restore, with the words an operator uses for them. */
const SUMMARY = [
  ['users', 'person', 'people'],
  ['courses', 'course', 'courses'],
  ['submissions', 'hand-in', 'hand-ins'],
  ['submission_files', 'hand-in file', 'hand-in files'],
]

function isGzip(file) {
  const fd = openSync(file, 'r')
  try {
    const head = Buffer.alloc(2)
    return readSync(fd, head, 0, 2, 0) === 2 && head[0] === 0x1f && head[1] === 0x8b
  } finally {
    closeSync(fd)
  }
}

async function fileSha256(file) {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(file)) hash.update(chunk)
  return hash.digest('hex')
}

/** The last bytes of the (unpacked) SQL; reading it to the end also checks gzip's own CRC. */
async function sqlTail(file, gzip) {
  let tail = Buffer.alloc(0)
  await pipeline(
    createReadStream(file),
    ...(gzip ? [createGunzip()] : []),
    new Writable({
      write(chunk, _enc, done) {
        tail = Buffer.concat([tail, chunk]).subarray(-512)
        done()
      },
    }),
  ).catch((err) => {
    throw new ToolError(
      `${shown(file)} cannot be read to the end (${err.message}): it is damaged or cut short; nothing was restored`,
    )
  })
  return tail.toString('utf8')
}

await main('restore', async () => {
  const argv = process.argv.slice(2)
  if (argv.includes('-h') || argv.includes('--help')) {
    process.stdout.write(`${USAGE}\n`)
    return
  }
  // `npm run restore FILE --force` hands --force to npm itself, which says so in npm_config_force.
  const force = argv.includes('--force') || process.env.npm_config_force === 'true'
  const unknown = argv.find((a) => a.startsWith('-') && a !== '--force')
  if (unknown) throw new ToolError(`unknown option ${unknown}\n${USAGE}`)
  const files = argv.filter((a) => !a.startsWith('-'))
  if (files.length !== 1)
    throw new ToolError(
      `${files.length === 0 ? 'name the backup file to restore' : 'name one backup file only'}\n${USAGE}`,
    )
  const file = files[0]
  if (!existsSync(file)) throw new ToolError(`no such file: ${file}`)
  if (!statSync(file).isFile()) throw new ToolError(`${file} is not a file`)

  const sidecar = `${file}.sha256`
  if (existsSync(sidecar)) {
    const sha256 = await fileSha256(file)
    const want = /^([0-9a-f]{64})\b/i.exec(readFileSync(sidecar, 'utf8').trim())?.[1]?.toLowerCase()
    if (!want) throw new ToolError(`${shown(sidecar)} does not hold a sha256 checksum; nothing was restored`)
    if (want !== sha256) {
      throw new ToolError(
        `${shown(file)} does not match its checksum in ${shown(sidecar)} (sha256 ${sha256}, expected ${want}): ` +
          'the file is damaged or was changed; nothing was restored',
      )
    }
    process.stdout.write(`[isentrope] checksum matches ${shown(sidecar)}\n`)
  } else {
    process.stdout.write(`[isentrope] no ${shown(sidecar)} beside the file; its checksum is not verified\n`)
  }
  const gzip = isGzip(file)
  if (!(await sqlTail(file, gzip)).includes(COMPLETED)) {
    throw new ToolError(
      `${shown(file)} does not end with mariadb-dump's "${COMPLETED}" line: it is cut short or not a dump; nothing was restored`,
    )
  }

  const db = await openDatabase({ createIfMissing: true })
  const args = clientArgs(db)
  const before = await listTables(db, args)
  if (before.length > 0 && !force) {
    const names =
      before
        .slice(0, 5)
        .map((t) => t.name)
        .join(', ') + (before.length > 5 ? ', …' : '')
    throw new ToolError(
      `${db.label} already has ${before.length} table${before.length === 1 ? '' : 's'} (${names}); restore wants an empty database.\n` +
        '  Nothing was changed. To replace them with the dump, run again with --force: it drops these tables first\n' +
        '  (make a backup first if you may need them: npm run backup).',
    )
  }
  if (before.length > 0) {
    // Dropping everything first leaves the database exactly as the dump has it: a table the dump
    // lacks (say, from a later migration) would otherwise stay and trip the next migration.
    process.stdout.write(`[isentrope] --force: dropping the ${before.length} tables of ${db.label}\n`)
    const list = (type) =>
      before
        .filter((t) => (type === 'VIEW') === (t.type === 'VIEW'))
        .map((t) => `\`${t.name.replace(/`/g, '``')}\``)
        .join(', ')
    const views = list('VIEW')
    const tables = list('TABLE')
    await query(
      db,
      args,
      [
        'SET FOREIGN_KEY_CHECKS = 0',
        views && `DROP VIEW IF EXISTS ${views}`,
        tables && `DROP TABLE IF EXISTS ${tables}`,
      ]
        .filter(Boolean)
        .join('; '),
    )
  }
  process.stdout.write(`[isentrope] restoring ${shown(file)} (${formatBytes(statSync(file).size)}) into ${db.label}\n`)

  // https://mariadb.com/kb/en/mariadb-command-line-client/ — stops at the first failing statement.
  const client = spawn('mariadb', [...args, db.database], { stdio: ['pipe', 'inherit', 'pipe'] })
  let clientErr = ''
  client.stderr.setEncoding('utf8').on('data', (d) => {
    clientErr = (clientErr + d).slice(-4000)
    process.stderr.write(d)
  })
  const exited = new Promise((resolve, reject) => {
    client.on('error', (e) => reject(new ToolError(`could not run mariadb: ${e.message}`)))
    client.on('close', (code, signal) => resolve(code ?? signal))
  })
  // Streamed end to end: the dump is never held in memory whole.
  let streamError = null
  await pipeline(createReadStream(file), ...(gzip ? [createGunzip()] : []), client.stdin).catch((err) => {
    streamError = err
  })
  const status = await exited
  if (status !== 0 || streamError) {
    const why =
      status !== 0
        ? `mariadb stopped (${status})${clientErr ? `: ${clientErr.trim()}` : ''}`
        : `reading the file failed: ${streamError.message}`
    throw new ToolError(
      `the restore did not finish: ${why}\n` +
        `  ${db.label} may now hold part of the dump: drop and re-create it empty before trying again.`,
    )
  }

  const after = await listTables(db, args)
  const counts = []
  for (const [table, one, many] of SUMMARY) {
    if (!after.some((t) => t.name === table)) continue
    const [row] = await query(db, args, `SELECT COUNT(*) FROM \`${table}\``)
    const n = row?.[0] ?? '?'
    counts.push(`${n} ${n === '1' ? one : many}`)
  }
  process.stdout.write(
    `[isentrope] restored ${shown(file)} into ${db.label}: ${after.length} table${after.length === 1 ? '' : 's'}` +
      (counts.length > 0 ? ` (${counts.join(', ')})` : '') +
      '\n',
  )
})
