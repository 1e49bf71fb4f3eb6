import { Router } from 'express'
import type { Authenticator } from '../auth/passport'
import type { SessionState, SessionUser } from '../../shared/schemas/auth'
import { SignInSchema } from '../../shared/schemas/auth'
import type { CsrfTokens } from '../auth/csrf'
import { validate } from '../middleware/validate'
import { retryAfterSeconds } from '../services/sign-in-throttle'

/**
 * Who may call:
 * - GET  /api/auth/session   anyone (returns user or null, and a CSRF token)
 * - POST /api/auth/sign-in   anyone (CSRF-protected like every POST); slowed down after failures,
 *                              429 + Retry-After when an attempt comes too early (README, "Sign-in policy")
 * - POST /api/auth/sign-out  anyone; signs out whoever is signed in
 */
export function authRoutes(passport: Authenticator, csrf: CsrfTokens): Router {
  const r = Router()

  r.get('/session', (req, res) => {
    const body: SessionState = { user: req.user ?? null, csrfToken: csrf.generate(req, res) }
    res.json(body)
  })

  r.post('/sign-in', validate('body', SignInSchema), (req, res, next) => {
    passport.authenticate('local', { session: true }, (err: unknown, user: SessionUser | false) => {
      if (err) {
        // A refused attempt says when to come back, for people (the message) and for clients.
        // https://www.rfc-editor.org/rfc/rfc9110#field.retry-after
        const wait = retryAfterSeconds(err)
        if (wait !== null) res.set('Retry-After', String(wait))
        return next(err)
      }
      if (!user) return next(new Error('local strategy returned no user and no error'))
      // passport ≥ 0.6 regenerates the session id at logIn (session fixation defence).
      req.logIn(user, (loginErr) => {
        if (loginErr) return next(loginErr)
        req.log.info({ userId: user.id }, 'signed in')
        const body: SessionState = { user, csrfToken: csrf.generate(req, res, true) }
        res.json(body)
      })
    })(req, res, next)
  })

  r.post('/sign-out', (req, res, next) => {
    const userId = req.user?.id
    req.logOut((err) => {
      if (err) return next(err)
      req.session.destroy((destroyErr) => {
        if (destroyErr) return next(destroyErr)
        res.clearCookie(SESSION_COOKIE, { path: '/' })
        if (userId) req.log.info({ userId }, 'signed out')
        const body: SessionState = { user: null, csrfToken: csrf.generate(req, res, true) }
        res.json(body)
      })
    })
  })

  return r
}

export const SESSION_COOKIE = 'isentrope.sid'
