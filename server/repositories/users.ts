import { and, count, eq, gte, lt } from 'drizzle-orm'
import type { SessionUser } from '../../shared/schemas/auth'
import type { Executor } from '../db/client'
import { signInFailures, users } from '../db/schema'

export interface UserWithHash extends SessionUser {
  passwordHash: string | null
}

const publicColumns = {
  id: users.id,
  email: users.email,
  displayName: users.displayName,
  isSiteAdmin: users.isSiteAdmin,
}

export async function findUserByEmail(db: Executor, email: string): Promise<UserWithHash | null> {
  const rows = await db
    .select({ ...publicColumns, passwordHash: users.passwordHash })
    .from(users)
    .where(eq(users.email, email.toLowerCase()))
    .limit(1)
  return rows[0] ?? null
}

export async function findUserById(db: Executor, id: number): Promise<SessionUser | null> {
  const rows = await db.select(publicColumns).from(users).where(eq(users.id, id)).limit(1)
  return rows[0] ?? null
}

export async function insertUser(
  db: Executor,
  u: { email: string; displayName: string; passwordHash: string | null; isSiteAdmin?: boolean },
): Promise<number> {
  const [row] = await db
    .insert(users)
    .values({ email: u.email.toLowerCase(), displayName: u.displayName, passwordHash: u.passwordHash, isSiteAdmin: u.isSiteAdmin ?? false })
    .$returningId()
  if (!row) throw new Error('insert into users returned no id')
  return row.id
}

export async function countRecentFailures(db: Executor, email: string, since: Date): Promise<number> {
  const [row] = await db
    .select({ n: count() })
    .from(signInFailures)
    .where(and(eq(signInFailures.email, email), gte(signInFailures.createdAt, since)))
  return row?.n ?? 0
}

export async function oldestRecentFailure(db: Executor, email: string, since: Date): Promise<Date | null> {
  const rows = await db
    .select({ at: signInFailures.createdAt })
    .from(signInFailures)
    .where(and(eq(signInFailures.email, email), gte(signInFailures.createdAt, since)))
    .orderBy(signInFailures.createdAt)
    .limit(1)
  return rows[0]?.at ?? null
}

export async function recordFailure(db: Executor, email: string, ip: string, pruneBefore: Date): Promise<void> {
  await db.insert(signInFailures).values({ email, ip: ip.slice(0, 64) })
  await db.delete(signInFailures).where(lt(signInFailures.createdAt, pruneBefore))
}

export async function clearFailures(db: Executor, email: string): Promise<void> {
  await db.delete(signInFailures).where(eq(signInFailures.email, email))
}
