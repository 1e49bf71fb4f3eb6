import type { SessionUser } from '../../shared/schemas/auth'
import { decoyHash, verifyPassword } from '../auth/password'
import type { Database } from '../db/client'
import { AppError } from '../errors'
import { findUserByEmail, findUserById } from '../repositories/users'
import type { SignInPolicy } from './sign-in-throttle'
import { clientAddress, pruneSignInCounters, reserveSignInAttempt, settleSuccessfulSignIn } from './sign-in-throttle'

/** One message for an unknown e-mail and a wrong password alike. */
export const BAD_CREDENTIALS = 'That e-mail and password do not match an account.'

/**
 * Checks an e-mail and password. The attempt is first counted as a failure (or refused with 429
 * when it comes before its wait is over, without looking at the password); the right password
 * then takes it back. Unknown e-mails are counted and answered exactly like wrong passwords.
 */
export async function signIn(
  db: Database,
  policy: SignInPolicy,
  input: { email: string; password: string; ip: string | undefined },
): Promise<SessionUser> {
  const email = input.email.toLowerCase()
  const reservation = await reserveSignInAttempt(db, policy, { email, address: clientAddress(input.ip) })
  const user = await findUserByEmail(db, email)
  const ok = user?.passwordHash
    ? await verifyPassword(user.passwordHash, input.password)
    : (await verifyPassword(await decoyHash(), input.password), false)
  if (user && ok) await settleSuccessfulSignIn(db, reservation)
  // Counters past their window count as zero anyway; pruning a few here keeps the table small
  // without a timer in every replica.
  await pruneSignInCounters(db, policy)
  if (!user || !ok) throw new AppError('bad_credentials', BAD_CREDENTIALS, 401)
  return { id: user.id, email: user.email, displayName: user.displayName, isSiteAdmin: user.isSiteAdmin }
}

export function loadSessionUser(db: Database, id: number): Promise<SessionUser | null> {
  return findUserById(db, id)
}
