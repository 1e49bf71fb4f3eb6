import { Router } from 'express'
import type { SessionState } from '../../shared/schemas/auth'
import { AcceptInvitationSchema, InvitationParamsSchema } from '../../shared/schemas/invitations'
import type { CsrfTokens } from '../auth/csrf'
import type { Database } from '../db/client'
import { valid, validate } from '../middleware/validate'
import { acceptInvitation, invitationInfo } from '../services/invitation-service'

/**
 * Mounted at /api/auth/invitations. Who may call:
 * - GET  /:token   anyone holding the link (no sign-in): 200 who it is for; 410 used or expired; 404 unknown
 * - POST /:token   anyone holding the link (CSRF-protected like every POST): sets the password, marks
 *                  the link used and signs the person in (a new session id, as at sign-in)
 */
export function invitationRoutes(db: Database, csrf: CsrfTokens): Router {
  const r = Router()
  const params = validate('params', InvitationParamsSchema)

  r.get('/:token', params, async (_req, res) => {
    const { token } = valid(res, 'params', InvitationParamsSchema)
    res.json(await invitationInfo(db, token))
  })

  r.post('/:token', params, validate('body', AcceptInvitationSchema), async (req, res, next) => {
    const { token } = valid(res, 'params', InvitationParamsSchema)
    const { password } = valid(res, 'body', AcceptInvitationSchema)
    const user = await acceptInvitation(db, token, password)
    // req.logIn is passport's (set up by passport.session() on every request); passport ≥ 0.6
    // regenerates the session id at logIn (session fixation defence).
    req.logIn(user, (err) => {
      if (err) return next(err)
      req.log.info({ userId: user.id }, 'password set from invitation; signed in')
      const body: SessionState = { user, csrfToken: csrf.generate(req, res, true) }
      res.json(body)
    })
  })

  return r
}
