import type { Request, RequestHandler, Response } from 'express'
import { doubleCsrf } from 'csrf-csrf'

export interface CsrfTokens {
  /** Issues a token (and its cookie); `fresh` forces a new one after sign-in/out. */
  generate: (req: Request, res: Response, fresh?: boolean) => string
  protect: RequestHandler
}

/**
 * Double-submit CSRF tokens (csrf-csrf): the client reads a token from /api/auth/session and
 * sends it in the `x-csrf-token` header on every state-changing request.
 * https://github.com/Psifi-Solutions/csrf-csrf#configuration
 */
export function createCsrf(secret: string, secureCookies: boolean): CsrfTokens {
  const { generateCsrfToken, doubleCsrfProtection } = doubleCsrf({
    getSecret: () => secret,
    // Tie tokens to the signed-in session; anonymous visitors (sign-in page) share one binding,
    // still protected by the SameSite, httpOnly cookie half of the pair.
    getSessionIdentifier: (req) => (req.user ? req.sessionID : 'anonymous'),
    cookieName: secureCookies ? '__Host-isentrope.csrf' : 'isentrope.csrf',
    cookieOptions: { sameSite: 'strict', path: '/', secure: secureCookies, httpOnly: true },
    getCsrfTokenFromRequest: (req) => req.headers['x-csrf-token'],
  })
  return {
    generate: (req, res, fresh = false) => generateCsrfToken(req, res, { overwrite: fresh }),
    protect: doubleCsrfProtection,
  }
}
