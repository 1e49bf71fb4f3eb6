import { eq } from 'drizzle-orm'
import type { SessionUser } from '../../shared/schemas/auth'
import type { Executor } from '../db/client'
import { users } from '../db/schema'

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
