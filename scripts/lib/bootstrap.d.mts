// Types for bootstrap.mjs, which stays plain JavaScript because it runs before node_modules
// exists; TypeScript callers (tests) import it through these declarations.
import type { ChildProcess, SpawnSyncOptions, SpawnSyncReturns } from 'node:child_process'

export const ROOT: string
export const DATA: string

export function log(message: string): void
export function fail(message: string): never
export function run(cmd: string, args: string[], options?: SpawnSyncOptions): SpawnSyncReturns<string | Buffer>
export function ensureDebianPackages(wanted: { bin: string; pkg: string }[]): void
export function ensureNodeModules(): void
export function localSecrets(): { dbPassword: string; sessionSecret: string }

export interface ProjectDb {
  host: string
  port: number
  database: string
  user: string
  password: string
  stop: () => Promise<void>
  /** False when an already running server was reused (then stop() leaves it running). */
  owned: boolean
}

export function startMariaDb(o: {
  name: string
  port: number
  database: string
  user: string
  password: string
  fresh?: boolean
}): Promise<ProjectDb>

export function dbEnv(db: { host: string; port: number; database: string; user: string; password: string }): {
  DB_HOST: string
  DB_PORT: string
  DB_NAME: string
  DB_USER: string
  DB_PASSWORD: string
}

export function externalDatabase(): boolean
export function startMaildev(o: { smtpPort: number; webPort: number; dir: string }): {
  child: ChildProcess
  smtpPort: number
  webPort: number
}
export function waitForHttp(url: string, timeoutMs?: number): Promise<void>
export function nodeBin(pkgPath: string): [string, string]
