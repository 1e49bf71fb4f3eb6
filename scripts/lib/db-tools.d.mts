// Types for db-tools.mjs (plain JavaScript like the rest of the backup and restore scripts), for
// the tests that call it directly.
export class ToolError extends Error {}

export interface DbTarget {
  host: string
  port: number
  user: string
  password: string
  database: string
}

export function onCleanup(fn: () => void | Promise<void>): void
export function runCleanups(): Promise<void>
export function main(tool: string, fn: () => Promise<void>): Promise<void>
export function databaseFromEnv(env?: NodeJS.ProcessEnv): DbTarget | null
export function openDatabase(o: { createIfMissing: boolean }): Promise<DbTarget & { label: string }>
export function clientArgs(db: DbTarget): string[]
export function query(db: DbTarget & { label: string }, args: string[], sql: string): Promise<string[][]>
export function listTables(db: DbTarget & { label: string }, args: string[]): Promise<{ name: string; type: string }[]>
export function formatBytes(n: number): string
export function shown(file: string): string
