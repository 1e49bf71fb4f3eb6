import type { SessionUser } from '../../shared/schemas/auth'
import { decoyHash, verifyPassword } from '../auth/password'
import type { Database } from '../db/client'
import { AppError } from '../errors'
import {
  clearFailures,
  countRecentFailures,
  findUserByEmail,
  findUserById,
  oldestRecentFailure,
  recordFailure,
} from '../repositories/users'

export interface SignInPolicy {
  maxFailures: number
  windowMinutes: number
}

/** One message for an unknown e-mail and a wrong password alike. */
export const BAD_CREDENTIALS = 'That e-mail and password do not match an account.'

/**
 * Checks an e-mail and password. Failures are counted per e-mail in the database; past the
 * limit the address is refused (even with the right password) until the window has passed.
 */
export async function signIn(
  db: Database,
  policy: SignInPolicy,
  input: { email: string; password: string; ip: string },
): Promise<SessionUser> {
  const email = input.email.toLowerCase()
  const windowStart = new Date(Date.now() - policy.windowMinutes * 60_000)
  const failures = await countRecentFailures(db, email, windowStart)
  if (failures >= policy.maxFailures) {
    const oldest = await oldestRecentFailure(db, email, windowStart)
    const retryAfterSeconds = oldest
      ? Math.max(1, Math.ceil((oldest.getTime() + policy.windowMinutes * 60_000 - Date.now()) / 1000))
      : policy.windowMinutes * 60
    throw new AppError(
      'too_many_attempts',
      `Too many failed sign-ins for this address. Try again in ${Math.ceil(retryAfterSeconds / 60)} minute(s), or ask your instructor to reset your password.`,
      429,
      { retryAfterSeconds },
    )
  }
  const user = await findUserByEmail(db, email)
  const ok = user?.passwordHash
    ? await verifyPassword(user.passwordHash, input.password)
    : (await verifyPassword(await decoyHash(), input.password), false)
  if (!user || !ok) {
    await recordFailure(db, email, input.ip, windowStart)
    throw new AppError('bad_credentials', BAD_CREDENTIALS, 401)
  }
  await clearFailures(db, email)
  return { id: user.id, email: user.email, displayName: user.displayName, isSiteAdmin: user.isSiteAdmin }
}

export function loadSessionUser(db: Database, id: number): Promise<SessionUser | null> {
  return findUserById(db, id)
}
