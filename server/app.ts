import { existsSync } from 'node:fs'
import path from 'node:path'
import compression from 'compression'
import cookieParser from 'cookie-parser'
import express from 'express'
import expressStaticGzip from 'express-static-gzip'
import session from 'express-session'
import MySQLStoreFactory from 'express-mysql-session'
import mysql from 'mysql2/promise'
import helmet from 'helmet'
import { pinoHttp } from 'pino-http'
import { createCsrf } from './auth/csrf'
import { createPassport } from './auth/passport'
import type { Config } from './config'
import { dbConnectionOptions, gradingBudget } from './config'
import type { Database } from './db/client'
import { withTimeouts } from './db/timeouts'
import { createGrader } from './grading/grading-pool'
import type { Grader } from './grading/grading-pool'
import { handInReceipt } from './services/submission-service'
import type { GradingContext } from './services/grading-service'
import type { Logger } from './logger'
import { apiNotFound, errorHandler } from './middleware/error-handler'
import { SESSION_COOKIE, authRoutes } from './routes/auth'
import { calendarFeedRoutes, myCalendarFeedRoutes } from './routes/calendar-feed'
import { courseAdminRoutes } from './routes/course-admin'
import { courseArchiveRoutes } from './routes/course-archive'
import { courseKeyRoutes } from './routes/course-keys'
import { courseRolloverRoutes } from './routes/course-rollover'
import { courseRoutes } from './routes/courses'
import { gradeRoutes } from './routes/grades'
import { healthRoutes } from './routes/health'
import { invitationRoutes } from './routes/invitations'
import { moduleRoutes } from './routes/modules'
import { reportRoutes } from './routes/reports'
import { reviewRoutes } from './routes/review'
import { rosterImportRoutes } from './routes/roster-import'
import { standWeekRoutes } from './routes/stand-week'
import { runRoutes } from './routes/runs'
import { standRoutes } from './routes/stands'
import { handInRoutes } from './routes/submissions'
import { signInPolicy } from './services/sign-in-throttle'

export interface AppDeps {
  config: Config
  db: Database
  logger: Logger
  /** Called after something queued mail, so the outbox worker can send it without waiting. */
  onMailQueued?: () => void
  /** The grading threads; when absent the app makes its own (and closes them in `close`). */
  grader?: Grader
  /** Called after a hand-in was stored, so the background grader looks at the queue at once. */
  onHandInStored?: () => void
}

export interface CreatedApp {
  app: express.Express
  /** Closes what the app itself opened (the session store's pool); the caller owns `db`. */
  close: () => Promise<void>
}

/** Builds the Express app without listening, so tests drive it through supertest. */
export function createApp({
  config,
  db,
  logger,
  onMailQueued,
  grader: givenGrader,
  onHandInStored,
}: AppDeps): CreatedApp {
  const app = express()
  const grader = givenGrader ?? createGrader(gradingBudget(config))
  const grading = gradingContext(db, { grader, logger, appUrl: config.APP_URL, onMailQueued })
  const secureCookies = config.APP_URL.startsWith('https://')
  if (config.TRUST_PROXY > 0) app.set('trust proxy', config.TRUST_PROXY)
  app.disable('x-powered-by')

  app.use(
    pinoHttp({
      logger,
      // Health probes would drown the log.
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      customLogLevel: (_req, res, err) =>
        err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info',
    }),
  )

  // JSON, CSV and the single-page app's index.html compressed per request (brotli when the browser
  // offers it). The built assets have their .br/.gz files already; compression skips a response that
  // already carries a Content-Encoding, so those go out as they are.
  // https://github.com/expressjs/compression#readme
  app.use(compression())

  const dist = path.resolve(config.CLIENT_DIST)
  const serveClient = Boolean(config.CLIENT_DIST) && existsSync(path.join(dist, 'index.html'))
  // The hashed scripts, styles and fonts first, with only the headers that mean something on them
  // (nosniff, same-origin resource policy, caching): a document's policies (CSP, frame and referrer
  // rules) apply to pages, and on ~35 files a page would add ~15 KB of headers to every first visit.
  if (serveClient) {
    const hashed = clientAssets(dist)
    app.use((req, res, next) => (req.path.startsWith('/assets/') ? hashed(req, res, next) : next()))
  }

  // Content-Security-Policy: our own origin only. Styles allow inline attributes because
  // PrimeVue's theme and KaTeX's layout set style attributes at run time.
  // https://helmetjs.github.io/#content-security-policy
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
          ...(secureCookies ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      crossOriginEmbedderPolicy: false,
      // HSTS only makes sense when the site is served over TLS.
      strictTransportSecurity: secureCookies ? { maxAge: 31_536_000, includeSubDomains: true } : false,
    }),
  )

  // The rest of the built client's files (index.html, public files) before sessions and body parsing: a script or stylesheet needs neither,
  // and a rolling session would otherwise write to the session store and send its cookie again with
  // every one of them.
  if (serveClient) app.use(clientAssets(dist))

  // Every API reply is about one signed-in person (JSON, CSV, PDF, their files): no shared or
  // browser cache may keep it. Set first, so a route that needs its own policy simply replaces it.
  // https://developer.mozilla.org/en-US/docs/Web/HTTP/Reference/Headers/Cache-Control#no-store
  app.use('/api', (_req, res, next) => {
    res.set('Cache-Control', 'no-store')
    next()
  })

  // 1 MB for ordinary JSON; the module routes parse their own bodies with a larger limit for
  // Markdown sources.
  const smallJson = express.json({ limit: '1mb' })
  const MODULE_ROUTES = /^\/api\/courses\/[^/]+\/(modules|submissions|review)(\/|$)/
  app.use((req, res, next) => (MODULE_ROUTES.test(req.path) ? next() : smallJson(req, res, next)))
  app.use(express.urlencoded({ extended: false, limit: '100kb' }))
  app.use(cookieParser())

  // Sessions live in MariaDB so any replica can serve any request.
  // https://github.com/chill117/express-mysql-session#usage
  const MySQLStore = MySQLStoreFactory(session)
  // Its own small pool, with the same fail-fast timeouts as the app's: a stalled database must
  // not hold a request in the session lookup either.
  const storePool = withTimeouts(
    mysql.createPool({ ...dbConnectionOptions(config), connectionLimit: 5, connectTimeout: 3000, timezone: 'Z' }),
    { acquireMs: config.DB_ACQUIRE_TIMEOUT_MS, queryMs: config.DB_QUERY_TIMEOUT_MS },
  )
  const store = new MySQLStore(
    {
      createDatabaseTable: true,
      clearExpired: true,
      checkExpirationInterval: 15 * 60_000,
      schema: { tableName: 'sessions', columnNames: { session_id: 'session_id', expires: 'expires', data: 'data' } },
    },
    // The store accepts a promise pool (it awaits what query() returns).
    storePool as unknown as ConstructorParameters<typeof MySQLStore>[1],
  )
  // A rolling session extends its expiry in the store after the answer has been written, all but
  // its last byte (express-session holds that back until the store replies). A store that fails
  // there would make express-session cut the connection, so a hand-in the server had stored would
  // reach the student as a network error. Missing one extension is harmless: it is logged, and the
  // answer completes. (A failed save of a changed session still fails the request.)
  type Touch = (sid: string, sess: unknown, done?: (err?: unknown) => void) => void
  const touch = (store.touch as Touch).bind(store)
  const forgivingTouch: Touch = (sid, sess, done) =>
    touch(sid, sess, (err) => {
      if (err) logger.warn({ err }, 'session expiry not extended: the session store did not answer')
      done?.(null)
    })
  Object.assign(store, { touch: forgivingTouch })
  app.use(
    session({
      name: SESSION_COOKIE,
      secret: config.SESSION_SECRET,
      store,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: secureCookies,
        maxAge: config.SESSION_MAX_AGE_HOURS * 3_600_000,
      },
    }),
  )

  const passport = createPassport(db, signInPolicy(config))
  app.use(passport.session())

  const csrf = createCsrf(config.SESSION_SECRET, secureCookies)
  const api = express.Router()
  api.use('/health', healthRoutes(db))
  // Calendar apps fetch feeds without a session or CSRF token; the address's token is the credential.
  api.use('/calendar', calendarFeedRoutes(db, { appUrl: config.APP_URL }))
  // Every state-changing request below needs the CSRF header (GET/HEAD/OPTIONS do not).
  api.use(csrf.protect)
  api.use('/auth', authRoutes(passport, csrf))
  api.use('/course-keys', courseKeyRoutes(db))
  api.use('/me', myCalendarFeedRoutes(db, { appUrl: config.APP_URL }))
  // Hand-ins first: their multipart bodies must not meet the module router's JSON parser.
  api.use(
    '/courses/:courseId',
    handInRoutes(db, { uploadLimitMb: config.UPLOAD_LIMIT_MB, grading, onHandInStored: () => onHandInStored?.() }),
  )
  api.use('/courses/:courseId', reviewRoutes(db))
  api.use('/courses/:courseId', runRoutes(db))
  api.use('/courses/:courseId', gradeRoutes(db, { appUrl: config.APP_URL, onMailQueued: () => onMailQueued?.() }))
  // Feedback reports; before the module router, so /modules/:moduleId/reports.zip is answered here.
  api.use('/courses/:courseId', reportRoutes(db))
  api.use(
    '/courses/:courseId/modules',
    moduleRoutes(db, { appUrl: config.APP_URL, onPublished: () => onMailQueued?.() }),
  )
  api.use('/courses/:courseId', courseAdminRoutes(db))
  api.use('/courses/:courseId', courseArchiveRoutes(db))
  api.use('/courses/:courseId', courseRolloverRoutes(db))
  api.use('/courses/:courseId', standWeekRoutes(db))
  api.use('/courses/:courseId', standRoutes(db, { appUrl: config.APP_URL, onMailQueued: () => onMailQueued?.() }))
  api.use('/courses', courseRoutes(db))
  api.use('/auth/invitations', invitationRoutes(db, csrf))
  api.use(
    '/courses/:courseId/roster/import',
    rosterImportRoutes(db, {
      appUrl: config.APP_URL,
      invitationTtlHours: config.INVITATION_TTL_HOURS,
      onMailQueued: () => onMailQueued?.(),
    }),
  )
  api.use(apiNotFound)
  app.use('/api', api)

  if (serveClient) {
    // Client-side routes: every other GET gets the single-page app.
    app.use((req, res, next) => {
      if (req.method !== 'GET' && req.method !== 'HEAD') return next()
      res.set('Cache-Control', 'no-cache')
      res.sendFile(path.join(dist, 'index.html'))
    })
  }

  app.use(errorHandler)

  return {
    app,
    close: async () => {
      await store.close()
      await storePool.end()
      if (!givenGrader) await grader.close()
    },
  }
}

/**
 * The client build: the .br or .gz file written beside each asset at build time when the browser
 * accepts it (with `Vary: Accept-Encoding`). Files under /assets carry a content hash in their names,
 * so a browser may keep them for a year without asking again; index.html names those files, so it
 * is checked with the server on every load (`no-cache` still lets the browser reuse it after a 304).
 * https://github.com/tkoenig89/express-static-gzip#readme
 * https://developer.mozilla.org/en-US/docs/Web/HTTP/Reference/Headers/Cache-Control#caching_static_assets
 */
function clientAssets(dist: string): express.RequestHandler {
  const assets = path.join(dist, 'assets') + path.sep
  return expressStaticGzip(dist, {
    enableBrotli: true,
    orderPreference: ['br', 'gzip'],
    index: false,
    serveStatic: {
      index: false,
      // Set below per file; serve-static's own max-age would otherwise replace it.
      cacheControl: false,
      // Hashed names never change content, and the ETag already serves revalidation of the rest.
      lastModified: false,
      setHeaders: (res, file) => {
        res.setHeader('X-Content-Type-Options', 'nosniff')
        res.setHeader('Cross-Origin-Resource-Policy', 'same-origin')
        if (file.startsWith(assets)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable')
        else if (path.basename(file).startsWith('index.html')) res.setHeader('Cache-Control', 'no-cache')
        else res.setHeader('Cache-Control', 'public, max-age=3600')
      },
    },
  })
}

/** How hand-ins are graded in this process: the threads, the log, and the receipt once graded. */
export function gradingContext(
  db: Database,
  o: { grader: Grader; logger: Logger; appUrl: string; onMailQueued?: (() => void) | undefined },
): GradingContext {
  return {
    grader: o.grader,
    logger: o.logger,
    receipt: (submissionId, outcome) => handInReceipt(db, submissionId, o.appUrl, outcome),
    ...(o.onMailQueued ? { onMailQueued: o.onMailQueued } : {}),
  }
}
