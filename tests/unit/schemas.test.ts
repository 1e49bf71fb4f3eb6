import { describe, expect, it } from 'vitest'
import { SignInSchema } from '../../shared/schemas/auth'
import { CreateCourseSchema } from '../../shared/schemas/courses'

describe('shared schemas', () => {
  it('lower-cases and trims the sign-in e-mail', () => {
    expect(SignInSchema.parse({ email: '  Ines.V@Calder-Ridge.EXAMPLE ', password: 'x' }).email).toBe(
      'ines.v@calder-ridge.example',
    )
  })

  it('explains an empty e-mail and an empty password separately', () => {
    const r = SignInSchema.safeParse({ email: '', password: '' })
    expect(r.success).toBe(false)
    const paths = r.success ? [] : r.error.issues.map((i) => i.path.join('.'))
    expect(paths).toContain('email')
    expect(paths).toContain('password')
  })

  it('accepts IANA time zones and refuses made-up ones', () => {
    const base = { code: 'AE 1', title: 'Lab', term: 'T1', institution: 'Uni' }
    expect(CreateCourseSchema.safeParse({ ...base, timeZone: 'Europe/Berlin' }).success).toBe(true)
    expect(CreateCourseSchema.safeParse({ ...base, timeZone: 'Nowhere/Atlantis' }).success).toBe(false)
  })
})
