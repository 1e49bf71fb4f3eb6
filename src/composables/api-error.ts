/**
 * The failure a composable hands to a page (`error` of useResource and useAction). Pages and
 * components import it from here, never from `src/api`, so only composables talk to the client.
 */
export { ApiError, asApiError } from '@/api/http'
export type { ApiErrorCode, ClientErrorCode } from '@/api/http'
