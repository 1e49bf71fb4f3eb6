import type { Ref } from 'vue'
import { fetchInvitation } from '@/api/invitations'
import { useResource } from './use-resource'

/** Who an invitation link is for (404 unknown, 410 used or expired, as ApiError). */
export function useInvitation(token: Ref<string>) {
  return useResource(() => fetchInvitation(token.value), token)
}
