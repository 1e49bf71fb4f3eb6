import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ZodError } from 'zod'
import type { ApiErrorBody, ErrorCode, FieldIssue } from '../../shared/schemas/errors'
import { AppError } from '../errors'
import { isDatabaseUnavailable } from '../db/errors'

function body(code: ErrorCode, message: string, details?: unknown): ApiErrorBody {
  return { error: details === undefined ? { code, message } : { code, message, details } }
}

/** Unknown /api routes answer JSON, not the client's HTML. */
export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json(body('not_found', `No API route ${req.method} ${req.originalUrl.split('?')[0]}.`))
}

/**
 * The one error middleware, registered last. Clients get `{ error: { code, message } }` and never
 * a stack trace; unexpected errors are logged with their stack on the server.
 */
export const errorHandler: ErrorRequestHandler = (err: unknown, req, res, next) => {
  if (res.headersSent) {
    next(err)
    return
  }
  if (err instanceof ZodError) {
    const details: FieldIssue[] = err.issues.map((i) => ({ path: i.path.join('.'), message: i.message }))
    const first = details[0]
    const message = first
      ? `${first.path ? `${first.path}: ` : ''}${first.message}${details.length > 1 ? ` (and ${details.length - 1} more)` : ''}`
      : 'The request is not valid.'
    res.status(400).json(body('validation_failed', message, details))
    return
  }
  if (err instanceof AppError) {
    res.status(err.status).json(body(err.code, err.message, err.details))
    return
  }
  const e = err as { type?: string; code?: string; status?: number; message?: string }
  if (e.type === 'entity.parse.failed') {
    res.status(400).json(body('malformed_json', 'The request body is not valid JSON.'))
    return
  }
  if (e.type === 'entity.too.large') {
    res.status(413).json(body('payload_too_large', 'The request body is too large.'))
    return
  }
  if (e.code === 'EBADCSRFTOKEN') {
    res
      .status(403)
      .json(
        body('csrf_failed', 'Your session’s security token is missing or out of date. Reload the page and try again.'),
      )
    return
  }
  if (isDatabaseUnavailable(err)) {
    req.log?.warn({ err }, 'database unavailable')
    res
      .status(503)
      .set('Retry-After', '5')
      .json(body('database_unavailable', 'The database is not reachable right now. Please try again in a moment.'))
    return
  }
  req.log?.error({ err }, 'unhandled error')
  res.status(500).json(body('internal_error', 'Something went wrong on our side. The error has been logged.'))
}
