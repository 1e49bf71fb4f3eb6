import type { ErrorCode } from '../shared/schemas/errors'

/**
 * The one error type services throw. Routes never build HTTP errors by hand; the error
 * middleware turns an AppError into `{ error: { code, message, details } }` with its status.
 */
export class AppError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly status: number = 400,
    readonly details?: unknown,
  ) {
    super(message)
    this.name = 'AppError'
  }
}

export const notFound = (what = 'That page or item') => new AppError('not_found', `${what} was not found.`, 404)
export const forbidden = (message = 'You do not have access to this.') => new AppError('forbidden', message, 403)
export const unauthenticated = () => new AppError('unauthenticated', 'Please sign in first.', 401)
