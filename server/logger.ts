import pino from 'pino'
import type { Logger } from 'pino'

export type { Logger }

/** Structured JSON logs (pino). Secrets and cookies are redacted. */
export function createLogger(level: string): Logger {
  return pino({
    level,
    base: { app: 'isentrope' },
    redact: ['req.headers.cookie', 'req.headers["x-csrf-token"]', 'res.headers["set-cookie"]', 'password'],
  })
}
