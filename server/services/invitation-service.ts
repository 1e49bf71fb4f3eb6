import type { SessionUser } from '../../shared/schemas/auth'
import type { InvitationInfo } from '../../shared/schemas/invitations'
import { hashPassword } from '../auth/password'
import type { Database } from '../db/client'
import { AppError } from '../errors'
import type { InvitationRow } from '../repositories/invitations'
import {
  claimInvitation,
  findInvitationByHash,
  retireOpenInvitations,
  setPasswordHash,
} from '../repositories/invitations'
import { hashInvitationToken } from './roster-import-service'

/**
 * Set-password invitations. The link carries a random token; only its SHA-256 is stored. A token
 * works once and until it expires; using it retires the person's other open invitations too.
 */
const unknownToken = () =>
  new AppError(
    'invitation_not_found',
    'This invitation link is not valid. Check that you opened the whole link from the e-mail, or ask your instructor for a new one.',
    404,
  )

function refuseIfSpent(inv: InvitationRow, now: Date): void {
  if (inv.usedAt !== null) {
    throw new AppError(
      'invitation_used',
      'This invitation has already been used to choose a password. Sign in with that password; if you have forgotten it, ask your instructor for a new invitation.',
      410,
    )
  }
  if (inv.expiresAt.getTime() <= now.getTime()) {
    throw new AppError(
      'invitation_expired',
      'This invitation has expired. Ask your instructor to send a new one (importing the roster again re-invites everyone whose invitation expired).',
      410,
    )
  }
}

export async function invitationInfo(db: Database, token: string): Promise<InvitationInfo> {
  const inv = await findInvitationByHash(db, hashInvitationToken(token))
  if (!inv) throw unknownToken()
  refuseIfSpent(inv, new Date())
  return {
    email: inv.email,
    displayName: inv.displayName,
    courseTitle: inv.courseCode !== null ? `${inv.courseCode} ${inv.courseTitle ?? ''}`.trim() : null,
    expiresAt: inv.expiresAt.toISOString(),
  }
}

/**
 * Sets the person's password and marks the invitation used, in one transaction. Of two
 * concurrent uses of one link, only the one whose guarded UPDATE changed the row sets a password.
 */
export async function acceptInvitation(db: Database, token: string, password: string): Promise<SessionUser> {
  const tokenHash = hashInvitationToken(token)
  const first = await findInvitationByHash(db, tokenHash)
  if (!first) throw unknownToken()
  refuseIfSpent(first, new Date())
  // Hash outside the transaction: argon2 is slow on purpose and should not hold row locks.
  const passwordHash = await hashPassword(password)
  return db.transaction(async (tx) => {
    const now = new Date()
    const inv = await findInvitationByHash(tx, tokenHash)
    if (!inv) throw unknownToken()
    if (!(await claimInvitation(tx, inv.id, now))) {
      const again = await findInvitationByHash(tx, tokenHash)
      refuseIfSpent(again ?? inv, now)
      throw new AppError('invitation_used', 'This invitation has already been used to choose a password.', 410)
    }
    await setPasswordHash(tx, inv.userId, passwordHash)
    await retireOpenInvitations(tx, inv.userId, now)
    return { id: inv.userId, email: inv.email, displayName: inv.displayName, isSiteAdmin: inv.isSiteAdmin }
  })
}
