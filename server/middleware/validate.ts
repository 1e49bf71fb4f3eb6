import type { NextFunction, Request, Response } from 'express'
import type { z } from 'zod'

/**
 * Parses one part of the request with a shared zod schema and keeps the parsed value in
 * `res.locals.valid[part]`; handlers read only that (never the raw request).
 * A ZodError reaches the error middleware, which answers 400 with the field paths.
 */
type Part = 'body' | 'params' | 'query'

export function validate<S extends z.ZodType>(part: Part, schema: S) {
  return (req: Request, res: Response, next: NextFunction): void => {
    const parsed = schema.parse(req[part])
    const locals = res.locals as { valid?: Partial<Record<Part, unknown>> }
    locals.valid = { ...locals.valid, [part]: parsed }
    next()
  }
}

/** Reads the value `validate(part, schema)` stored. */
export function valid<S extends z.ZodType>(res: Response, part: Part, _schema: S): z.infer<S> {
  const locals = res.locals as { valid?: Partial<Record<Part, unknown>> }
  if (!locals.valid || !(part in locals.valid)) {
    throw new Error(`validate('${part}') middleware missing on this route`)
  }
  return locals.valid[part] as z.infer<S>
}
