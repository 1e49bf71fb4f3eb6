import type { SessionState, SignIn } from '@shared/schemas/auth'
import { http } from './http'

export const fetchSession = () => http<SessionState>('GET', '/api/auth/session')
export const postSignIn = (body: SignIn) => http<SessionState>('POST', '/api/auth/sign-in', body)
export const postSignOut = () => http<SessionState>('POST', '/api/auth/sign-out')
