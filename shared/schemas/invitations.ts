import { z } from 'zod'

/** A new password must be at least this long (sign-in itself accepts any non-empty password). */
export const NEW_PASSWORD_MIN = 10

/** `:token` of an invitation link; the shape is not checked here (an unknown token is a 404). */
export const InvitationParamsSchema = z.object({
  token: z.string().min(1).max(200),
})

/** Setting a password from an invitation; the same rule checks the form in the browser. */
export const AcceptInvitationSchema = z.object({
  password: z
    .string({ error: 'password: enter a new password.' })
    .min(NEW_PASSWORD_MIN, `password: use at least ${NEW_PASSWORD_MIN} characters.`)
    .max(200, 'password: at most 200 characters.'),
})
export type AcceptInvitation = z.infer<typeof AcceptInvitationSchema>

/** What the set-password page shows about an invitation. */
export interface InvitationInfo {
  email: string
  displayName: string
  /** The course whose roster import sent it, as "CODE Title". */
  courseTitle: string | null
  expiresAt: string
}
