import { z } from 'zod'

/** Sign-in form and request body. */
export const SignInSchema = z.object({
  email: z
    .string({ error: 'Enter your e-mail address.' })
    .trim()
    .min(1, 'Enter your e-mail address.')
    .max(254, 'That e-mail address is too long.')
    .email('Enter a valid e-mail address, such as name@university.example.')
    .transform((s) => s.toLowerCase()),
  password: z
    .string({ error: 'Enter your password.' })
    .min(1, 'Enter your password.')
    .max(200, 'That password is too long.'),
})
export type SignIn = z.infer<typeof SignInSchema>

export const CourseRoleSchema = z.enum(['instructor', 'ta', 'student'])
export type CourseRole = z.infer<typeof CourseRoleSchema>

/** The signed-in person as the client sees them. */
export const SessionUserSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean(),
})
export type SessionUser = z.infer<typeof SessionUserSchema>

export interface SessionState {
  user: SessionUser | null
  csrfToken: string
}
