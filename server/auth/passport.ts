import passportLib from 'passport'
export type Authenticator = InstanceType<typeof passportLib.Passport>
import { Strategy as LocalStrategy } from 'passport-local'
import { SignInSchema } from '../../shared/schemas/auth'
import type { Database } from '../db/client'
import { loadSessionUser, signIn } from '../services/auth-service'
import type { SignInPolicy } from '../services/sign-in-throttle'

/**
 * One Passport instance per app (not the global singleton) so test apps stay independent.
 * https://www.passportjs.org/concepts/authentication/sessions/
 */
export function createPassport(db: Database, policy: SignInPolicy): Authenticator {
  const passport = new passportLib.Passport()
  passport.use(
    new LocalStrategy(
      { usernameField: 'email', passwordField: 'password', passReqToCallback: true },
      (req, _email, _password, done) => {
        // The route has already validated the body with the shared schema.
        const input = SignInSchema.parse(req.body)
        // req.ip honours TRUST_PROXY: behind a load balancer it is the client's address, not the balancer's.
        signIn(db, policy, { ...input, ip: req.ip }).then(
          (user) => done(null, user),
          (err: unknown) => done(err),
        )
      },
    ),
  )
  passport.serializeUser((user, done) => done(null, user.id))
  passport.deserializeUser((id: number, done) => {
    loadSessionUser(db, id).then(
      (user) => done(null, user ?? false),
      (err: unknown) => done(err),
    )
  })
  return passport
}
