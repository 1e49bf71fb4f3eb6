import type { SessionState } from '@shared/schemas/auth'
import type { AcceptInvitation, InvitationInfo } from '@shared/schemas/invitations'
import { http } from './http'

const url = (token: string) => `/api/auth/invitations/${encodeURIComponent(token)}`

export const fetchInvitation = (token: string) => http<InvitationInfo>('GET', url(token))
export const postAcceptInvitation = (token: string, body: AcceptInvitation) =>
  http<SessionState>('POST', url(token), body)
