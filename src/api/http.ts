import type { ApiErrorBody, ErrorCode } from '@shared/schemas/errors'

/** Codes the client itself gives a failure that never got a server's answer (or got an unreadable one). */
export type ClientErrorCode =
  'http_error' | 'network_error' | 'client_error' | 'aborted' | 'bad_response' | 'bad_assignment'

/** A server code or one of the client's own. */
export type ApiErrorCode = ErrorCode | ClientErrorCode

/** Every failed API call becomes one of these; views show `message`, forms use `details`. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message)
    this.name = 'ApiError'
  }
}

/** Any thrown value as the ApiError the pages know how to show. */
export function asApiError(err: unknown): ApiError {
  return err instanceof ApiError ? err : new ApiError(0, 'client_error', String(err))
}

let csrfToken = ''

/** Set by the session store whenever the server hands out a fresh token. */
export function setCsrfToken(token: string): void {
  csrfToken = token
}

/** The CSRF header for a state-changing request made outside {@link http} (e.g. an upload with progress). */
export function csrfHeader(): Record<string, string> {
  return { 'x-csrf-token': csrfToken }
}

/** The server's error body (already read as text) → an ApiError with the server's own message. */
export function apiErrorFrom(status: number, statusText: string, text: string): ApiError {
  let parsed: unknown
  try {
    parsed = text ? JSON.parse(text) : undefined
  } catch {
    parsed = undefined
  }
  const err = (parsed as ApiErrorBody | undefined)?.error
  return new ApiError(
    status,
    err?.code ?? 'http_error',
    err?.message ?? `The server answered ${status} ${statusText}.`.replace(' .', '.'),
    err?.details,
  )
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE'

/**
 * The one way the client talks to the server: same-origin, JSON, the CSRF header on every
 * state-changing call, and errors turned into ApiError with the server's own message.
 */
export async function http<T>(method: Method, url: string, body?: unknown): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' }
  if (body !== undefined) headers['Content-Type'] = 'application/json'
  if (method !== 'GET') headers['x-csrf-token'] = csrfToken
  let res: Response
  try {
    res = await fetch(url, {
      method,
      headers,
      credentials: 'same-origin',
      body: body === undefined ? undefined : JSON.stringify(body),
    })
  } catch {
    throw new ApiError(0, 'network_error', 'Could not reach the Isentrope server. Check your connection and try again.')
  }
  const text = await res.text()
  if (!res.ok) throw apiErrorFrom(res.status, res.statusText, text)
  let parsed: unknown = undefined
  if (text) {
    try {
      parsed = JSON.parse(text)
    } catch {
      parsed = undefined
    }
  }
  return parsed as T
}
