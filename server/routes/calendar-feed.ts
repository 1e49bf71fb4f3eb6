import { Router } from 'express'
import type { NextFunction, Request, Response } from 'express'
import { notFound } from '../errors'
import type { Database } from '../db/client'
import { signedIn } from '../middleware/authorize'
import {
  calendarFeed,
  calendarFeedStatus,
  makeCalendarFeed,
  turnOffCalendarFeed,
} from '../services/calendar-feed-service'

interface Opts {
  appUrl: string
}

/**
 * Mounted at /api/me. Who may call:
 * - GET    /calendar-feed      signed in: whether their feed is on and since when (never the token)
 * - POST   /calendar-feed      signed in (CSRF): makes or replaces their feed; answers { url } this once
 * - DELETE /calendar-feed      signed in (CSRF): turns their feed off
 */
export function myCalendarFeedRoutes(db: Database, opts: Opts): Router {
  const r = Router()
  r.get('/calendar-feed', signedIn, async (req, res) => {
    res.json(await calendarFeedStatus(db, req.user!.id))
  })
  r.post('/calendar-feed', signedIn, async (req, res) => {
    res.status(201).json(await makeCalendarFeed(db, req.user!.id, opts.appUrl))
  })
  r.delete('/calendar-feed', signedIn, async (req, res) => {
    await turnOffCalendarFeed(db, req.user!.id)
    res.status(204).end()
  })
  return r
}

/**
 * Mounted at /api/calendar. No session: the token in the address is the credential.
 * - GET /:token.ics   anyone holding the address: the iCalendar feed; unknown or malformed → 404
 */
export function calendarFeedRoutes(db: Database, opts: Opts): Router {
  const r = Router()
  // The token is checked in the service rather than by `validate`: a malformed one must get the same
  // 404 as an unknown one, not a 400 that tells the two apart.
  r.get('/:token.ics', async (req, res) => {
    const text = await calendarFeed(db, req.params.token, opts.appUrl)
    // The feed is one person's: no shared cache may keep it, and a browser need not either.
    res.set('Cache-Control', 'private, no-store')
    res.type('text/calendar; charset=utf-8').send(text)
  })
  // A token that is not even valid percent-encoding fails while the router decodes it: the same 404.
  r.use((err: unknown, _req: Request, _res: Response, next: NextFunction) => {
    next(err instanceof URIError ? notFound('That calendar') : err)
  })
  return r
}
